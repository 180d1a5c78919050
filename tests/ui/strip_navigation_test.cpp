// Drives the real workstation window by key and mouse events on the
// offscreen platform: cursor by frame, event and lane; configurable keys;
// the review queue key; zoom between crops and the compact kymograph; and
// that painting asks only for the thumbnails on screen.
#include <QScrollBar>
#include <QSettings>
#include <QTemporaryDir>
#include <QtTest>

#include "demo_project.h"
#include "synthetic_crops.h"
#include "ui/main_window.h"
#include "ui/review_queue_panel.h"
#include "ui/time_strip_view.h"

using namespace budledger;
using ui::Command;

class StripNavigationTest : public QObject {
  Q_OBJECT

 private slots:
  void initTestCase() {
    QVERIFY(dir_.isValid());
    project_ = dir_.filePath(QStringLiteral("nav.budledger"));
    testsupport::DemoOptions o;
    o.positions = 2;
    o.rows = 2;
    o.cols = 3;
    o.frames = 80;
    events_ = testsupport::writeDemoProject(project_, o);
  }

  void init() {
    settings_ = std::make_unique<QSettings>(dir_.filePath(QStringLiteral("nav-%1.ini").arg(++run_)),
                                            QSettings::IniFormat);
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

  void cleanup() { window_.reset(); }

  void opensOnTheFirstPositionAtFrameZero() {
    QCOMPARE(strips()->lanes().size(), size_t(6));
    QCOMPARE(strips()->position(), window_->session()->positions().front().id);
    QCOMPARE(strips()->cursorLane(), 0);
    QCOMPARE(strips()->cursorFrame(), 0);
  }

  void arrowsMoveByFrameAndLane() {
    auto* s = strips();
    for (int i = 0; i < 3; ++i) QTest::keyClick(s, Qt::Key_Right);
    QCOMPARE(s->cursorFrame(), 3);
    QTest::keyClick(s, Qt::Key_Right, Qt::ShiftModifier);
    QCOMPARE(s->cursorFrame(), 13);
    QTest::keyClick(s, Qt::Key_Left);
    QCOMPARE(s->cursorFrame(), 12);
    QTest::keyClick(s, Qt::Key_Down);
    QTest::keyClick(s, Qt::Key_Down);
    QCOMPARE(s->cursorLane(), 2);
    QTest::keyClick(s, Qt::Key_Up);
    QCOMPARE(s->cursorLane(), 1);
    QTest::keyClick(s, Qt::Key_End);
    QCOMPARE(s->cursorFrame(), 79);
    QTest::keyClick(s, Qt::Key_Right);  // stays inside the movie
    QCOMPARE(s->cursorFrame(), 79);
    QTest::keyClick(s, Qt::Key_Home);
    QCOMPARE(s->cursorFrame(), 0);
    QTest::keyClick(s, Qt::Key_Up);
    QTest::keyClick(s, Qt::Key_Up);
    QCOMPARE(s->cursorLane(), 0);
  }

  void bracketsJumpFromEventToEvent() {
    auto* s = strips();
    const auto& list = window_->session()->events(*s->currentTrap());
    QVERIFY(list.size() >= 3);
    QTest::keyClick(s, Qt::Key_BracketRight);
    QCOMPARE(s->cursorFrame(), list[0].event.frame);
    QCOMPARE(s->selectedEvent(), std::optional(list[0].event.id));
    QTest::keyClick(s, Qt::Key_BracketRight);
    // Two calls can share a frame; the jump goes to the next later frame.
    auto later = std::find_if(list.begin(), list.end(), [&](const ui::ReviewEvent& e) {
      return e.event.frame > list[0].event.frame;
    });
    QCOMPARE(s->cursorFrame(), later->event.frame);
    QTest::keyClick(s, Qt::Key_BracketLeft);
    QCOMPARE(s->cursorFrame(), list[0].event.frame);
    QVERIFY(s->eventAtCursor());
    QCOMPARE(s->eventAtCursor()->event.id, list[0].event.id);
  }

  void keysAreConfigurableAndKept() {
    window_->keyMap().setKeys(Command::NextFrame, {QKeySequence(Qt::Key_K)});
    QTest::keyClick(strips(), Qt::Key_K);
    QCOMPARE(strips()->cursorFrame(), 1);
    QTest::keyClick(strips(), Qt::Key_Right);  // no longer bound
    QCOMPARE(strips()->cursorFrame(), 1);
    // Stored in the settings: a new key map reads the same binding.
    ui::KeyMap again(*settings_);
    QCOMPARE(again.keys(Command::NextFrame), QList<QKeySequence>{QKeySequence(Qt::Key_K)});
    QCOMPARE(again.conflicts(Command::LaneUp, QKeySequence(Qt::Key_K)),
             QList<Command>{Command::NextFrame});
    again.resetToDefaults();
    QCOMPARE(window_->keyMap().keys(Command::NextFrame),
             QList<QKeySequence>{QKeySequence(Qt::Key_Right)});
  }

  void queueKeyGoesToTheNeediestCall() {
    auto* model = window_->queuePanel()->model();
    QVERIFY(model->rowCount() > 1);
    const ui::ReviewItem first = model->item(0);
    QTest::keyClick(strips(), Qt::Key_Q);
    QCOMPARE(strips()->currentTrap(), std::optional(first.trap));
    QCOMPARE(strips()->cursorFrame(), first.frame);
    QCOMPARE(strips()->selectedEvent(), std::optional(first.eventId));
    QTest::keyClick(strips(), Qt::Key_Q);
    QCOMPARE(strips()->cursorFrame(), model->item(1).frame);
    QTest::keyClick(strips(), Qt::Key_Q, Qt::ShiftModifier);
    QCOMPARE(strips()->cursorFrame(), first.frame);
  }

  void zoomSwitchesBetweenCropsAndKymograph() {
    QTest::keyClick(strips(), Qt::Key_1);
    QCOMPARE(strips()->geometry().mode(), ui::StripMode::Crops);
    QTest::keyClick(strips(), Qt::Key_0);
    QCOMPARE(strips()->geometry().mode(), ui::StripMode::Kymograph);
    // The whole movie fits the viewport.
    QVERIFY(strips()->axis().contentWidth() <= strips()->viewport()->width() + 1);
    const double before = strips()->axis().pixelsPerFrame();
    QTest::keyClick(strips(), Qt::Key_Plus);
    QVERIFY(strips()->axis().pixelsPerFrame() > before);
  }

  void clickingAGlyphSelectsItsEvent() {
    auto* s = strips();
    QTest::keyClick(s, Qt::Key_1);
    const auto& list = window_->session()->events(s->lanes()[1]);
    const ui::ReviewEvent& e = list[1];
    const QRectF lane = s->geometry().eventRect(1, s->axis().contentWidth());
    s->setCursor(1, e.event.frame);  // scrolls it into view
    const QPoint at(
        static_cast<int>(s->axis().frameCentre(e.event.frame)) - s->horizontalScrollBar()->value(),
        static_cast<int>(lane.center().y()) - s->verticalScrollBar()->value());
    s->setCursor(0, 0);
    s->setCursor(1, e.event.frame);
    s->selectEvent(std::nullopt);
    QTest::mouseClick(s->viewport(), Qt::LeftButton, {}, at);
    QCOMPARE(s->selectedEvent(), std::optional(e.event.id));
    QCOMPARE(s->cursorLane(), 1);
  }

  void paintingAsksOnlyForVisibleThumbnails() {
    auto* s = strips();
    QTest::keyClick(s, Qt::Key_1);
    window_->loader()->cache().clear();
    s->viewport()->repaint();
    window_->loader()->waitForIdle();
    const auto frames =
        s->axis().framesIn(s->horizontalScrollBar()->value(),
                           s->horizontalScrollBar()->value() + s->viewport()->width());
    const auto lanes = s->geometry().lanesIn(
        s->verticalScrollBar()->value(), s->verticalScrollBar()->value() + s->viewport()->height());
    const int visible = (frames.second - frames.first + 1) * (lanes.second - lanes.first + 1);
    const int cached = window_->loader()->cache().count();
    // The strips' slots plus the large trap view's one native-size crop.
    QVERIFY2(cached <= visible + 1, qPrintable(QStringLiteral("%1 > %2").arg(cached).arg(visible)));
    QVERIFY(cached > 0);
  }

 private:
  ui::TimeStripView* strips() const { return window_->strips(); }

  QTemporaryDir dir_;
  QString project_;
  std::vector<Event> events_;
  int run_ = 0;
  std::unique_ptr<QSettings> settings_;
  std::unique_ptr<ui::MainWindow> window_;
};

QTEST_MAIN(StripNavigationTest)
#include "strip_navigation_test.moc"
