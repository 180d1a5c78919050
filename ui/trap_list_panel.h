#pragma once
// TrapListPanel: the trap list dock — every trap with its review state,
// divisions, open calls and need, filterable by state and position, sortable
// by any column. Choosing a row asks to go to that trap.
#include <QWidget>
#include <optional>

#include "ui/trap_list_model.h"

class QComboBox;
class QTreeView;

namespace budledger::ui {

class TrapListPanel : public QWidget {
  Q_OBJECT

 public:
  explicit TrapListPanel(QWidget* parent = nullptr);
  void setSession(ReviewSession* session, const ReviewQueueModel* queue);
  // Marks `trap` as the current row without emitting trapChosen.
  void showCurrent(TrapId trap);
  void setStateFilter(std::optional<ReviewState> state);

  QTreeView* view() const { return view_; }
  TrapListModel* model() const { return model_; }
  TrapFilterModel* filter() const { return filter_; }

 signals:
  void trapChosen(budledger::ui::TrapId trap);

 private:
  TrapListModel* model_ = nullptr;
  TrapFilterModel* filter_ = nullptr;
  QTreeView* view_ = nullptr;
  QComboBox* state_ = nullptr;
  QComboBox* position_ = nullptr;
  bool quiet_ = false;
};

}  // namespace budledger::ui
