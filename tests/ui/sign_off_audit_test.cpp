// The sign-off dialog and the audit trail on a real session: what a PI is
// shown (counts per group, reviewers, open items) is what the session holds;
// signing through the dialog locks the scope, a technician cannot sign, and
// revoking needs a reason. The audit trail lists every entry with who, what,
// before, after and why, filters by text, action and person, and exports
// exactly the filtered rows as CSV.
#include <QFile>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QRadioButton>
#include <QTemporaryDir>
#include <QTreeWidget>
#include <QtTest>

#include "demo_project.h"
#include "ui/audit_trail_panel.h"
#include "ui/review_session.h"
#include "ui/sign_off_dialog.h"
#include "ui/sign_off_summary.h"

using namespace budledger;

class SignOffAuditTest : public QObject {
  Q_OBJECT

 private slots:
  void init() {
    path_ = dir_.filePath(QStringLiteral("so-%1.budledger").arg(++run_));
    testsupport::DemoOptions o;
    o.positions = 2;
    o.rows = 1;
    o.cols = 4;
    o.frames = 60;
    testsupport::writeDemoProject(path_, o);
    session_ = std::make_unique<ui::ReviewSession>(path_, store::Database::Access::ReadWrite);
    session_->setActor({"Tess Tech", "technician"});
    // A few decisions to review: accept two calls of trap 0, delete one of trap 1.
    const auto& t0 = session_->events({1, 0});
    session_->accept(t0[0].event.id, QStringLiteral("clear bud"));
    session_->accept(t0[1].event.id);
    session_->reject(session_->events({1, 1})[0].event.id, QStringLiteral("debris, not a bud"));
  }
  void cleanup() { session_.reset(); }

  void summaryCountsWhatTheSessionHolds() {
    const auto s = ui::summariseForSignOff(*session_, store::Scope::ofPosition(1));
    QCOMPARE(s.traps, 4);
    QCOMPARE(s.groups.size(), size_t(1));
    int mothers = 0, open = 0;
    for (int t = 0; t < 4; ++t) {
      mothers += static_cast<int>(session_->tenures({1, t}).size());
      for (const auto& e : session_->events({1, t})) open += e.decision == ui::Decision::Proposed;
    }
    QCOMPARE(s.groups[0].mothers, mothers);
    QCOMPARE(s.openCalls, open);
    QCOMPARE(s.tenuresWithoutDecision, 2);  // traps 2 and 3
    QCOMPARE(s.reviewers.size(), size_t(1));
    QCOMPARE(s.reviewers[0].name, QStringLiteral("Tess Tech"));
    QCOMPARE(s.reviewers[0].decisions, 3);
    QVERIFY(s.hasOpenItems());
    const auto all = ui::summariseForSignOff(*session_, store::Scope::experiment());
    QCOMPARE(all.traps, 8);
    QCOMPARE(all.groups.size(), size_t(2));  // the demo's two positions are two groups
  }

  void piSignsThroughTheDialogAndTheTrapLocks() {
    ui::SignOffDialog dialog(*session_, {QStringLiteral("Pia Lead"), QStringLiteral("PI")},
                             ui::TrapId{1, 0});
    QVERIFY(dialog.findChild<QPushButton*>(QStringLiteral("signButton"))->isEnabled());
    QVERIFY(dialog.openItems()->text().contains(QStringLiteral("undecided")));
    QCOMPARE(dialog.groupsTable()->topLevelItemCount(), 2);
    // Choose "trap 0 of pos1" and sign.
    const auto buttons = dialog.findChildren<QRadioButton*>();
    QCOMPARE(buttons.size(), 3);
    buttons[2]->setChecked(true);
    QVERIFY(dialog.scope() == store::Scope::ofTrap(1, 0));
    dialog.findChild<QLineEdit*>(QStringLiteral("signOffReason"))->setText(QStringLiteral("final"));
    QCOMPARE(dialog.sign(), QString());
    QCOMPARE(session_->reviewState({1, 0}), ui::ReviewState::SignedOff);
    QVERIFY(session_->locked({1, 0}));
    QVERIFY(!session_->locked({1, 1}));
    // The lock is real: the store refuses an edit inside it.
    session_->setActor({"Tess Tech", "technician"});
    QVERIFY_THROWS_EXCEPTION(store::EditRefused,
                             session_->accept(session_->events({1, 0})[2].event.id));
    // Revoking needs a reason, then unlocks.
    auto* active = dialog.findChild<QTreeWidget*>(QStringLiteral("activeSignOffs"));
    QCOMPARE(active->topLevelItemCount(), 1);
    active->setCurrentItem(active->topLevelItem(0));
    QVERIFY(!dialog.revokeSelected().isEmpty());
    QVERIFY(session_->locked({1, 0}));
    dialog.findChildren<QLineEdit*>().last()->setText(QStringLiteral("one more look"));
    QCOMPARE(dialog.revokeSelected(), QString());
    QVERIFY(!session_->locked({1, 0}));
  }

  void aTechnicianCannotSign() {
    ui::SignOffDialog dialog(*session_, {QStringLiteral("Tess Tech"), QStringLiteral("technician")},
                             ui::TrapId{1, 0});
    QVERIFY(!dialog.findChild<QPushButton*>(QStringLiteral("signButton"))->isEnabled());
    QVERIFY(!dialog.sign().isEmpty());
    QVERIFY(!session_->locked({1, 0}));
  }

  void auditTrailShowsFiltersAndExports() {
    ui::AuditTrailPanel panel;
    panel.setDatabase(&session_->project().db());
    auto* model = panel.model();
    // The engine run plus the three decisions.
    QCOMPARE(model->rowCount(), 4);
    const auto& reject = model->entry(3);
    QCOMPARE(ui::AuditTrailModel::text(reject, ui::AuditTrailModel::ActionColumn),
             QStringLiteral("delete"));
    QCOMPARE(ui::AuditTrailModel::text(reject, ui::AuditTrailModel::WhoColumn),
             QStringLiteral("Tess Tech"));
    QCOMPARE(ui::AuditTrailModel::text(reject, ui::AuditTrailModel::WhyColumn),
             QStringLiteral("debris, not a bud"));
    QVERIFY(ui::AuditTrailModel::text(reject, ui::AuditTrailModel::BeforeColumn)
                .contains(QStringLiteral("\"status\":\"proposed\"")));
    QVERIFY(ui::AuditTrailModel::text(reject, ui::AuditTrailModel::AfterColumn)
                .contains(QStringLiteral("\"status\":\"rejected\"")));
    // New entries appear on refresh, appended.
    session_->accept(session_->events({1, 2})[0].event.id);
    panel.refresh();
    QCOMPARE(model->rowCount(), 5);
    // Filters: by action, by text, by person.
    panel.filter()->setAction(QStringLiteral("accept"));
    QCOMPARE(panel.filter()->rowCount(), 3);
    panel.filter()->setText(QStringLiteral("clear bud"));
    QCOMPARE(panel.filter()->rowCount(), 1);
    panel.filter()->setText({});
    panel.filter()->setAction({});
    panel.filter()->setPerson(QStringLiteral("Tess Tech"));
    QCOMPARE(panel.filter()->rowCount(), 4);
    // CSV: a header and the filtered rows; a reason with a comma is quoted (RFC 4180).
    const QString csv = dir_.filePath(QStringLiteral("audit.csv"));
    QCOMPARE(panel.exportCsv(csv), QString());
    QFile f(csv);
    QVERIFY(f.open(QIODevice::ReadOnly));
    const QStringList lines =
        QString::fromUtf8(f.readAll()).split(QStringLiteral("\r\n"), Qt::SkipEmptyParts);
    QCOMPARE(lines.size(), 5);
    QCOMPARE(lines[0], QStringLiteral("seq,utc,actor,role,action,target,before,after,reason"));
    QVERIFY(lines[3].endsWith(QStringLiteral(",\"debris, not a bud\"")));
    QVERIFY(lines[3].contains(QStringLiteral("\"{\"\"frame\"\":")));  // JSON quotes doubled
  }

 private:
  QTemporaryDir dir_;
  QString path_;
  int run_ = 0;
  std::unique_ptr<ui::ReviewSession> session_;
};

QTEST_MAIN(SignOffAuditTest)
#include "sign_off_audit_test.moc"
