// Editing through the real window by key and mouse events: accept, move,
// delete and add at the cursor, each one journal entry with the reviewer's
// name; lifespans and survival curves recomputed; undo/redo round trip back
// to the exact state; the journal replayed from scratch equals the live
// state; a sign-off locks its traps until revoked; a project held by another
// program opens read-only and refuses edits.
#include <QDockWidget>
#include <QLabel>
#include <QScrollBar>
#include <QSettings>
#include <QStatusBar>
#include <QTemporaryDir>
#include <QtTest>

#include "core/store/journal.h"
#include "core/store/materialised.h"
#include "core/store/verify.h"
#include "demo_project.h"
#include "synthetic_crops.h"
#include "ui/audit_trail_model.h"
#include "ui/audit_trail_panel.h"
#include "ui/edit_commands.h"
#include "ui/main_window.h"
#include "ui/results_panel.h"
#include "ui/strip_workspace.h"
#include "ui/survival_model.h"
#include "ui/time_strip_view.h"

using namespace budledger;
using ui::Decision;

namespace {

struct Snapshot {
  std::vector<std::tuple<std::int64_t, int, int, int>> events;  // id, frame, kind, decision
  friend bool operator==(const Snapshot&, const Snapshot&) = default;
};

Snapshot snapshot(const ui::ReviewSession& s, ui::TrapId t) {
  Snapshot out;
  for (const auto& e : s.events(t))
    out.events.emplace_back(e.event.id, e.event.frame, static_cast<int>(e.event.kind),
                            static_cast<int>(e.decision));
  return out;
}

int divisions(const ui::ReviewSession& s, ui::TrapId t) {
  int n = 0;
  for (const auto& ten : s.tenures(t)) n += ten.divisions;
  return n;
}

}  // namespace

class EditingTest : public QObject {
  Q_OBJECT

 private slots:
  void init() {
    QVERIFY(dir_.isValid());
    project_ = dir_.filePath(QStringLiteral("edit-%1.budledger").arg(++run_));
    testsupport::DemoOptions o;
    o.positions = 2;
    o.rows = 2;
    o.cols = 3;
    o.frames = 80;
    events_ = testsupport::writeDemoProject(project_, o);
    settings_ = std::make_unique<QSettings>(dir_.filePath(QStringLiteral("s-%1.ini").arg(run_)),
                                            QSettings::IniFormat);
    settings_->setValue(QStringLiteral("identity/name"), QStringLiteral("Tess Tech"));
    settings_->setValue(QStringLiteral("identity/role"), QStringLiteral("technician"));
    openWindow();
  }

  void cleanup() { window_.reset(); }

  void acceptByKeyIsOneJournalEntryWithTheReviewer() {
    const auto before = journal().size();
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    const ui::ReviewEvent* e = strips()->eventAtCursor();
    QVERIFY(e);
    const std::int64_t id = e->event.id;
    QTest::keyClick(strips(), Qt::Key_Return);
    QCOMPARE(session()->event(id)->decision, Decision::Accepted);
    const auto j = journal();
    QCOMPARE(j.size(), before + 1);
    QVERIFY(j.back().action == store::JournalAction::Accept);
    QCOMPARE(j.back().actor, std::string("Tess Tech"));
    QCOMPARE(j.back().role, std::string("technician"));
    QCOMPARE(j.back().target, "event:" + std::to_string(id));
    QCOMPARE(session()->reviewState(*strips()->currentTrap()), ui::ReviewState::InProgress);
    QVERIFY(window_->statusBar()->currentMessage().contains(QStringLiteral("accept")));
    // Accepting it again changes nothing and records nothing.
    QTest::keyClick(strips(), Qt::Key_Return);
    QCOMPARE(journal().size(), before + 1);
  }

  void hiddenAuditTrailCatchesUpWhenShown() {
    auto* dock = window_->findChild<QDockWidget*>(QStringLiteral("auditDock"));
    QVERIFY(dock && !dock->isVisible());
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Return);
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Delete);
    dock->show();
    QTRY_COMPARE(window_->auditTrail()->model()->rowCount(), static_cast<int>(journal().size()));
    // While shown it follows every edit.
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Return);
    QCOMPARE(window_->auditTrail()->model()->rowCount(), static_cast<int>(journal().size()));
  }

  void moveByKeysRecomputesTheLifespan() {
    const ui::TrapId t = *strips()->currentTrap();
    const auto sep = firstOf(t, EventKind::Separation);
    strips()->setCursor(0, sep.frame);
    strips()->selectEvent(sep.id);
    const auto tenureBefore = session()->tenures(t).front().separationFrames;
    QTest::keyClick(strips(), Qt::Key_Right, Qt::ControlModifier);
    QCOMPARE(session()->event(sep.id)->event.frame, sep.frame + 1);
    QCOMPARE(session()->event(sep.id)->decision, Decision::Moved);
    QCOMPARE(session()->event(sep.id)->proposedFrame, std::optional(sep.frame));
    QCOMPARE(strips()->cursorFrame(), sep.frame + 1);  // the cursor follows the event
    const auto after = session()->tenures(t).front().separationFrames;
    QVERIFY(std::find(after.begin(), after.end(), sep.frame + 1) != after.end());
    QVERIFY(std::find(after.begin(), after.end(), sep.frame) == after.end());
    QCOMPARE(after.size(), tenureBefore.size());
    QVERIFY(journal().back().action == store::JournalAction::Move);
    QVERIFY(journal().back().before.find("\"frame\":" + std::to_string(sep.frame)) !=
            std::string::npos);
  }

  void deleteAndAddChangeTheDivisionCount() {
    const ui::TrapId t = *strips()->currentTrap();
    const int d0 = divisions(*session(), t);
    const long mothers = window_->survival()->mothers();
    const auto sep = firstOf(t, EventKind::Separation);
    strips()->setCursor(0, sep.frame);
    QTest::keyClick(strips(), Qt::Key_Delete);
    QCOMPARE(session()->event(sep.id)->decision, Decision::Rejected);
    QCOMPARE(divisions(*session(), t), d0 - 1);
    // The results panel and the live curves follow within the same event.
    QVERIFY(window_->resultsPanel()->summary().contains(QString::number(d0 - 1)));
    QCOMPARE(window_->survival()->mothers(), mothers);
    // Add a separation back two frames later, by key.
    strips()->setCursor(0, sep.frame + 2);
    strips()->selectEvent(std::nullopt);
    QTest::keyClick(strips(), Qt::Key_S);
    QCOMPARE(divisions(*session(), t), d0);
    QVERIFY(journal().back().action == store::JournalAction::Add);
    const auto added = strips()->selectedEvent();
    QVERIFY(added && *added < 0);  // added events have negative ids
    QCOMPARE(session()->event(*added)->decision, Decision::Added);
    QVERIFY(session()->event(*added)->event.kind == EventKind::Separation);
  }

  void undoRedoRoundTripIsExact() {
    const ui::TrapId t = *strips()->currentTrap();
    const Snapshot start = snapshot(*session(), t);
    const int d0 = divisions(*session(), t);
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Return);  // accept
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Right, Qt::ControlModifier);  // move
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Delete);  // delete
    strips()->setCursor(0, 79);
    QTest::keyClick(strips(), Qt::Key_B);  // add
    const Snapshot edited = snapshot(*session(), t);
    QVERIFY(!(edited == start));
    const auto entries = journal().size();
    for (int i = 0; i < 4; ++i) QTest::keyClick(strips(), Qt::Key_Z, Qt::ControlModifier);
    QCOMPARE(snapshot(*session(), t), start);
    QCOMPARE(divisions(*session(), t), d0);
    for (int i = 0; i < 4; ++i)
      QTest::keyClick(strips(), Qt::Key_Z, Qt::ControlModifier | Qt::ShiftModifier);
    QCOMPARE(snapshot(*session(), t), edited);
    // Undo and redo are new entries; nothing was rewritten.
    QCOMPARE(journal().size(), entries + 8);
    QVERIFY(journal().back().action == store::JournalAction::Redo);
    // Replaying the journal from scratch gives exactly the live state.
    const auto report = store::verifyProject(session()->project());
    QVERIFY2(report.ok(), report.problems.empty() ? "" : report.problems.front().c_str());
    ui::ReviewSession fresh(project_, store::Database::Access::ReadOnly);
    QCOMPARE(snapshot(fresh, t), edited);
  }

  void acceptConfidentJournalsEachEvent() {
    const ui::TrapId t = *strips()->currentTrap();
    int confident = 0;
    for (const auto& e : session()->events(t))
      confident += e.decision == Decision::Proposed && e.event.confidence >= 0.9;
    QVERIFY(confident >= 2);
    const auto before = journal().size();
    QTest::keyClick(strips(), Qt::Key_Return, Qt::ShiftModifier);
    QCOMPARE(journal().size(), before + static_cast<size_t>(confident));
    for (const auto& e : session()->events(t))
      if (e.event.confidence >= 0.9) QCOMPARE(e.decision, Decision::Accepted);
  }

  void dragMovesAnEvent() {
    auto* s = strips();
    const ui::TrapId t = *s->currentTrap();
    const auto bud = firstOf(t, EventKind::Bud);
    s->setCursor(0, bud.frame);
    const double y = s->geometry().eventRect(0, 1).center().y() - s->verticalScrollBar()->value();
    auto xOf = [&](int f) {
      return static_cast<int>(s->axis().frameCentre(f)) - s->horizontalScrollBar()->value();
    };
    const QPoint from(xOf(bud.frame), static_cast<int>(y));
    const QPoint to(xOf(bud.frame + 2), static_cast<int>(y));
    QTest::mousePress(s->viewport(), Qt::LeftButton, {}, from);
    QMouseEvent move(QEvent::MouseMove, QPointF(to), s->viewport()->mapToGlobal(QPointF(to)),
                     Qt::NoButton, Qt::LeftButton, Qt::NoModifier);
    QApplication::sendEvent(s->viewport(), &move);
    QTest::mouseRelease(s->viewport(), Qt::LeftButton, {}, to);
    QCOMPARE(session()->event(bud.id)->event.frame, bud.frame + 2);
    QVERIFY(journal().back().action == store::JournalAction::Move);
  }

  void signOffLocksEditsUntilRevoked() {
    const ui::TrapId t = *strips()->currentTrap();
    session()->setActor({"Pia Lead", "PI"});
    const auto c = session()->signOff(store::Scope::ofTrap(t.position, t.trap),
                                      store::SignMeaning::Approved, QStringLiteral("counts final"));
    QVERIFY(c.recorded());
    QCOMPARE(session()->reviewState(t), ui::ReviewState::SignedOff);
    window_->edits()->setSession(session());  // back to the technician
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    const std::int64_t id = strips()->eventAtCursor()->event.id;
    const auto before = journal().size();
    QTest::keyClick(strips(), Qt::Key_Return);
    QCOMPARE(journal().size(), before);
    QCOMPARE(session()->event(id)->decision, Decision::Proposed);
    QVERIFY(window_->statusBar()->currentMessage().startsWith(QStringLiteral("Not done")));
    // Another trap is not locked.
    QTest::keyClick(strips(), Qt::Key_Down);
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    QTest::keyClick(strips(), Qt::Key_Return);
    QCOMPARE(journal().size(), before + 1);
    // Revoked, the first trap can be edited again.
    session()->setActor({"Pia Lead", "PI"});
    QVERIFY(session()->revoke(c.seq, QStringLiteral("recount trap")).recorded());
    window_->edits()->setSession(session());
    QCOMPARE(session()->reviewState(t), ui::ReviewState::NotStarted);  // its accept was refused
    QTest::keyClick(strips(), Qt::Key_Up);
    strips()->setCursor(0, session()->event(id)->event.frame);
    QTest::keyClick(strips(), Qt::Key_Return);
    QCOMPARE(session()->event(id)->decision, Decision::Accepted);
  }

  void heldProjectOpensReadOnlyAndRefusesEdits() {
    window_.reset();
    // Another program holds the write lock.
    auto holder = store::Project::open(project_.toStdString());
    QVERIFY(!holder.readOnly());
    openWindow();
    QVERIFY(session()->readOnly());
    auto* banner = window_->workspace()->banner();
    QVERIFY(banner->isVisible());
    QVERIFY(banner->text().startsWith(QStringLiteral("Read-only")));
    QVERIFY(!window_->action(ui::Command::Accept)->isEnabled());
    const auto before = journal().size();
    QTest::keyClick(strips(), Qt::Key_BracketRight);
    const std::int64_t id = strips()->eventAtCursor()->event.id;
    QTest::keyClick(strips(), Qt::Key_Return);
    QTest::keyClick(strips(), Qt::Key_B);
    QTest::keyClick(strips(), Qt::Key_Delete);
    QCOMPARE(journal().size(), before);
    QCOMPARE(session()->event(id)->decision, Decision::Proposed);
    // Even a direct call is refused, writing nothing.
    QVERIFY(!window_->edits()->run(ui::Command::Accept));
    QCOMPARE(journal().size(), before);
  }

 private:
  void openWindow() {
    ui::MainWindowOptions options;
    auto crops = std::make_shared<testsupport::SyntheticCrops>(events_);
    options.cropSources = [crops](ui::ReviewSession&) { return crops; };
    window_ = std::make_unique<ui::MainWindow>(*settings_, options);
    window_->resize(1400, 900);
    window_->show();
    QVERIFY(QTest::qWaitForWindowExposed(window_.get()));
    window_->activateWindow();
    QVERIFY(QTest::qWaitForWindowActive(window_.get()));
    QVERIFY(!window_->openProject(project_, true).has_value());
    strips()->setFocus();
  }
  ui::TimeStripView* strips() const { return window_->strips(); }
  ui::ReviewSession* session() const { return window_->session(); }
  std::vector<store::JournalEntry> journal() const {
    return store::readJournal(session()->project().db());
  }
  Event firstOf(ui::TrapId t, EventKind kind) const {
    for (const auto& e : session()->events(t))
      if (e.event.kind == kind && e.decision == Decision::Proposed) return e.event;
    return {};
  }

  QTemporaryDir dir_;
  QString project_;
  std::vector<Event> events_;
  int run_ = 0;
  std::unique_ptr<QSettings> settings_;
  std::unique_ptr<ui::MainWindow> window_;
};

QTEST_MAIN(EditingTest)
#include "editing_test.moc"
