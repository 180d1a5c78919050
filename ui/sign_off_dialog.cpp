#include "ui/sign_off_dialog.h"

#include <QComboBox>
#include <QDialogButtonBox>
#include <QFormLayout>
#include <QGroupBox>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QRadioButton>
#include <QTreeWidget>
#include <QVBoxLayout>

#include "core/store/editor.h"
#include "ui/counted.h"
#include "ui/sign_off_summary.h"

namespace budledger::ui {

SignOffDialog::SignOffDialog(ReviewSession& session, const Identity& who,
                             std::optional<TrapId> current, QWidget* parent)
    : QDialog(parent), session_(session), who_(who), current_(current) {
  setWindowTitle(tr("Sign off"));
  setObjectName(QStringLiteral("signOffDialog"));

  identity_ = new QLabel(this);
  identity_->setWordWrap(true);
  experiment_ = new QRadioButton(tr("The whole experiment"), this);
  position_ = new QRadioButton(this);
  trap_ = new QRadioButton(this);
  experiment_->setChecked(true);
  if (current_) {
    const auto* pos = session_.position(current_->position);
    const QString name =
        pos ? QString::fromStdString(pos->name) : QString::number(current_->position);
    position_->setText(tr("Position %1").arg(name));
    trap_->setText(tr("Trap %1 of %2").arg(current_->trap).arg(name));
  } else {
    position_->hide();
    trap_->hide();
  }
  auto* scopeBox = new QGroupBox(tr("What you approve"), this);
  auto* scopeLayout = new QVBoxLayout(scopeBox);
  scopeLayout->addWidget(experiment_);
  scopeLayout->addWidget(position_);
  scopeLayout->addWidget(trap_);

  groups_ = new QTreeWidget(this);
  groups_->setObjectName(QStringLiteral("signOffGroups"));
  groups_->setRootIsDecorated(false);
  groups_->setHeaderLabels({tr("Group"), tr("Traps"), tr("Mothers"), tr("Died"), tr("Censored"),
                            tr("Divisions"), tr("Median RLS")});
  groups_->header()->setSectionResizeMode(QHeaderView::ResizeToContents);
  groups_->header()->setStretchLastSection(false);  // keep the medians under their heading
  groups_->setMinimumHeight(110);
  reviewers_ = new QLabel(this);
  reviewers_->setWordWrap(true);
  open_ = new QLabel(this);
  open_->setObjectName(QStringLiteral("signOffOpen"));
  open_->setWordWrap(true);

  meaning_ = new QComboBox(this);
  meaning_->addItem(tr("Approved — the counts are final"),
                    static_cast<int>(store::SignMeaning::Approved));
  meaning_->addItem(tr("Reviewed — checked, not yet final"),
                    static_cast<int>(store::SignMeaning::Reviewed));
  reason_ = new QLineEdit(this);
  reason_->setObjectName(QStringLiteral("signOffReason"));
  reason_->setPlaceholderText(tr("e.g. “all traps proofread twice; ready for the paper”"));
  signButton_ = new QPushButton(tr("Sign"), this);
  signButton_->setObjectName(QStringLiteral("signButton"));
  auto* form = new QFormLayout;
  form->addRow(tr("Meaning"), meaning_);
  form->addRow(tr("Reason"), reason_);

  active_ = new QTreeWidget(this);
  active_->setObjectName(QStringLiteral("activeSignOffs"));
  active_->setRootIsDecorated(false);
  active_->setHeaderLabels({tr("#"), tr("Scope"), tr("By"), tr("Meaning"), tr("When (UTC)")});
  active_->header()->setSectionResizeMode(QHeaderView::ResizeToContents);
  active_->setMaximumHeight(120);
  revokeReason_ = new QLineEdit(this);
  revokeReason_->setPlaceholderText(tr("Why it is withdrawn (required)"));
  auto* revokeButton = new QPushButton(tr("Revoke selected"), this);
  auto* revokeRow = new QHBoxLayout;
  revokeRow->addWidget(revokeReason_, 1);
  revokeRow->addWidget(revokeButton);
  auto* activeBox = new QGroupBox(tr("Active sign-offs (their traps are locked)"), this);
  auto* activeLayout = new QVBoxLayout(activeBox);
  activeLayout->addWidget(active_);
  activeLayout->addLayout(revokeRow);

  auto* buttons = new QDialogButtonBox(QDialogButtonBox::Close, this);
  buttons->addButton(signButton_, QDialogButtonBox::ActionRole);

  auto* l = new QVBoxLayout(this);
  l->addWidget(identity_);
  l->addWidget(scopeBox);
  l->addWidget(groups_);
  l->addWidget(reviewers_);
  l->addWidget(open_);
  l->addLayout(form);
  l->addWidget(activeBox);
  l->addWidget(buttons);

  for (QRadioButton* b : {experiment_, position_, trap_})
    connect(b, &QRadioButton::toggled, this, [this](bool on) {
      if (on) refresh();
    });
  connect(signButton_, &QPushButton::clicked, this, [this] {
    const QString err = sign();
    emit said(err.isEmpty() ? tr("Signed off") : tr("Not signed: %1").arg(err));
  });
  connect(revokeButton, &QPushButton::clicked, this, [this] {
    const QString err = revokeSelected();
    emit said(err.isEmpty() ? tr("Sign-off revoked") : tr("Not revoked: %1").arg(err));
  });
  connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
  refresh();
  resize(680, 640);
}

store::Scope SignOffDialog::scope() const {
  if (current_ && trap_->isChecked())
    return store::Scope::ofTrap(current_->position, current_->trap);
  if (current_ && position_->isChecked()) return store::Scope::ofPosition(current_->position);
  return store::Scope::experiment();
}

void SignOffDialog::refresh() {
  const bool pi = who_.isPi() && who_.complete();
  identity_->setText(
      pi ? tr("Signing as <b>%1</b> (%2).").arg(who_.name.toHtmlEscaped(), who_.role)
         : tr("Signing needs the <b>PI</b> role; you are %1 (%2). Change it under "
              "Review → Who is reviewing….")
               .arg(who_.name.isEmpty() ? tr("not named") : who_.name.toHtmlEscaped(),
                    who_.role.isEmpty() ? tr("no role") : who_.role));
  signButton_->setEnabled(pi && !session_.readOnly());

  const SignOffSummary s = summariseForSignOff(session_, scope());
  groups_->clear();
  for (const auto& g : s.groups) {
    auto* item = new QTreeWidgetItem(
        groups_,
        {g.group.isEmpty() ? tr("(no group)") : g.group, QString::number(g.traps),
         QString::number(g.mothers), QString::number(g.died), QString::number(g.censored),
         QString::number(g.divisions),
         g.medianLifespan ? QString::number(*g.medianLifespan, 'g', 4) : tr("not reached")});
    for (int c = 1; c < 7; ++c) item->setTextAlignment(c, Qt::AlignRight);
  }
  QStringList people;
  for (const auto& r : s.reviewers)
    people << tr("%1 (%2): %3")
                  .arg(r.name, r.role, counted(r.decisions, tr("%1 decision"), tr("%1 decisions")));
  reviewers_->setText(people.isEmpty()
                          ? tr("<b>Reviewers:</b> nobody has decided anything here yet.")
                          : tr("<b>Reviewers:</b> %1").arg(people.join(QStringLiteral("; "))));
  QStringList open;
  if (s.openCalls) open << counted(s.openCalls, tr("%1 undecided call"), tr("%1 undecided calls"));
  if (s.tenuresWithoutDecision)
    open << counted(s.tenuresWithoutDecision, tr("%1 trap not started"),
                    tr("%1 traps not started"));
  if (s.carryOverItems)
    open << counted(s.carryOverItems, tr("%1 decision a re-analysis could not carry over"),
                    tr("%1 decisions a re-analysis could not carry over"));
  if (s.engineFlaggedTraps)
    open << counted(s.engineFlaggedTraps, tr("%1 trap flagged by the engine"),
                    tr("%1 traps flagged by the engine"));
  if (s.lockedTraps)
    open << counted(s.lockedTraps, tr("%1 trap already signed off"),
                    tr("%1 traps already signed off"));
  open_->setText(open.isEmpty()
                     ? tr("<b>Open items:</b> none — %1 in scope.")
                           .arg(counted(s.traps, tr("%1 trap"), tr("%1 traps")))
                     : tr("<b>Open items:</b> %1.").arg(open.join(QStringLiteral(", "))));

  active_->clear();
  for (const auto& so : session_.activeSignOffs()) {
    auto* item = new QTreeWidgetItem(
        active_, {QString::number(so.id), QString::fromStdString(so.scopeName),
                  QStringLiteral("%1 (%2)").arg(QString::fromStdString(so.person),
                                                QString::fromStdString(so.role)),
                  QString::fromStdString(std::string(toString(so.meaning))),
                  QString::fromStdString(so.utc)});
    item->setData(0, Qt::UserRole, static_cast<qlonglong>(so.id));
  }
}

QString SignOffDialog::sign() {
  if (!who_.isPi()) return tr("signing needs the PI role");
  session_.setActor({who_.name.toStdString(), who_.role.toStdString()});
  try {
    const auto meaning = static_cast<store::SignMeaning>(meaning_->currentData().toInt());
    const auto c = session_.signOff(scope(), meaning, reason_->text().trimmed());
    refresh();
    return c.recorded() ? QString() : tr("the same sign-off is already recorded");
  } catch (const std::exception& e) {
    return QString::fromStdString(e.what());
  }
}

QString SignOffDialog::revokeSelected() {
  const QTreeWidgetItem* item = active_->currentItem();
  if (!item) return tr("choose a sign-off in the list");
  if (revokeReason_->text().trimmed().isEmpty()) return tr("a revocation needs a reason");
  session_.setActor({who_.name.toStdString(), who_.role.toStdString()});
  try {
    session_.revoke(item->data(0, Qt::UserRole).toLongLong(), revokeReason_->text().trimmed());
    revokeReason_->clear();
    refresh();
    return {};
  } catch (const std::exception& e) {
    return QString::fromStdString(e.what());
  }
}

}  // namespace budledger::ui
