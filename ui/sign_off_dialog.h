#pragma once
// SignOffDialog: Review → Sign off. Shows a PI what a sign-off over the chosen
// scope (the experiment, the current position or the current trap) would
// approve — counts and median lifespan per group, who decided, what is still
// open — and records the signature with a meaning and a reason through the
// session. It also lists the active sign-offs and revokes one, with a reason.
// Only the PI role may sign; signed traps stay locked until revoked.
#include <QDialog>
#include <optional>

#include "core/store/scope.h"
#include "ui/identity.h"
#include "ui/review_session.h"

class QComboBox;
class QLabel;
class QLineEdit;
class QPushButton;
class QRadioButton;
class QTreeWidget;

namespace budledger::ui {

class SignOffDialog : public QDialog {
  Q_OBJECT

 public:
  SignOffDialog(ReviewSession& session, const Identity& who, std::optional<TrapId> current,
                QWidget* parent = nullptr);
  store::Scope scope() const;
  QTreeWidget* groupsTable() const { return groups_; }
  QLabel* openItems() const { return open_; }
  // Signs with the dialog's choices; returns the error, or empty on success.
  QString sign();
  QString revokeSelected();

 signals:
  void said(const QString& message);

 private:
  void refresh();

  ReviewSession& session_;
  Identity who_;
  std::optional<TrapId> current_;
  QRadioButton* experiment_ = nullptr;
  QRadioButton* position_ = nullptr;
  QRadioButton* trap_ = nullptr;
  QComboBox* meaning_ = nullptr;
  QLineEdit* reason_ = nullptr;
  QTreeWidget* groups_ = nullptr;
  QLabel* reviewers_ = nullptr;
  QLabel* open_ = nullptr;
  QLabel* identity_ = nullptr;
  QPushButton* signButton_ = nullptr;
  QTreeWidget* active_ = nullptr;
  QLineEdit* revokeReason_ = nullptr;
};

}  // namespace budledger::ui
