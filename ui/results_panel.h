#pragma once
// ResultsPanel: what the current trap's events amount to right now — each
// mother's tenure (frames, hours, outcome), her division count and the
// intervals between divisions. It reads the session's cached tenures (one
// lineage computation per change of a trap) and refreshes when that trap
// changes or the cursor moves to another trap.
#include <QWidget>
#include <optional>

#include "ui/review_session.h"

class QLabel;
class QTreeWidget;

namespace budledger::ui {

class ResultsPanel : public QWidget {
  Q_OBJECT

 public:
  explicit ResultsPanel(QWidget* parent = nullptr);
  void setSession(ReviewSession* session);
  void showTrap(std::optional<TrapId> trap);
  QTreeWidget* table() const { return table_; }
  QString summary() const;

 private:
  void refresh();

  ReviewSession* session_ = nullptr;
  std::optional<TrapId> trap_;
  QLabel* title_ = nullptr;
  QTreeWidget* table_ = nullptr;
  QLabel* intervals_ = nullptr;
};

}  // namespace budledger::ui
