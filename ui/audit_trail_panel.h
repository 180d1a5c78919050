#pragma once
// AuditTrailPanel: the audit-trail dock — the journal table with a search
// box, action and person filters and Export CSV…; double-clicking an entry
// about an event asks to go to that event.
#include <QWidget>

#include "ui/audit_trail_model.h"

class QComboBox;
class QLabel;
class QLineEdit;
class QTableView;

namespace budledger::ui {

class AuditTrailPanel : public QWidget {
  Q_OBJECT

 public:
  explicit AuditTrailPanel(QWidget* parent = nullptr);
  void setDatabase(store::Database* db);
  void refresh();
  AuditTrailModel* model() const { return model_; }
  AuditTrailFilter* filter() const { return filter_; }
  QTableView* view() const { return view_; }
  // Writes the filtered rows to `path`; returns the error, or empty.
  QString exportCsv(const QString& path) const;

 signals:
  void eventChosen(std::int64_t eventId);

 private:
  void refillPeople();
  AuditTrailModel* model_ = nullptr;
  AuditTrailFilter* filter_ = nullptr;
  QTableView* view_ = nullptr;
  QLineEdit* search_ = nullptr;
  QComboBox* action_ = nullptr;
  QComboBox* person_ = nullptr;
  QLabel* count_ = nullptr;
};

}  // namespace budledger::ui
