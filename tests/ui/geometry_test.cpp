// TimeAxis and StripGeometry: frame <-> x, lanes <-> y, zoom modes and the
// clock labels of the time axis. Values are worked by hand from the
// definitions in time_axis.h and strip_geometry.h; the measured cells drawn
// on the large trap view are worked from the features JSON the engine stores.
#include <QtTest>

#include "ui/strip_geometry.h"
#include "ui/time_axis.h"
#include "ui/trap_image_view.h"

using budledger::ui::StripGeometry;
using budledger::ui::StripMode;
using budledger::ui::TimeAxis;

class GeometryTest : public QObject {
  Q_OBJECT

 private slots:
  void frameAndXRoundTrip() {
    TimeAxis a(240, 10.0, 8.0);
    QCOMPARE(a.contentWidth(), 1920.0);
    QCOMPARE(a.frameLeft(3), 24.0);
    QCOMPARE(a.frameCentre(3), 28.0);
    QCOMPARE(a.frameAt(24.0), 3);
    QCOMPARE(a.frameAt(31.99), 3);
    QCOMPARE(a.frameAt(32.0), 4);
    QCOMPARE(a.frameAt(-5), 0);       // clamped
    QCOMPARE(a.frameAt(99999), 239);  // clamped
    for (int f = 0; f < 240; f += 17) QCOMPARE(a.frameAt(a.frameCentre(f)), f);
  }

  void visibleFramesAreExactAtEdges() {
    TimeAxis a(100, std::nullopt, 10.0);
    QCOMPARE(a.framesIn(0, 100), std::make_pair(0, 9));   // [0,100) ends before frame 10
    QCOMPARE(a.framesIn(5, 101), std::make_pair(0, 10));  // touches frame 10
    QCOMPARE(a.framesIn(995, 2000), std::make_pair(99, 99));
    const auto none = a.framesIn(1000, 2000);
    QVERIFY(none.first > none.second);
    const auto empty = TimeAxis(0, std::nullopt, 10).framesIn(0, 100);
    QVERIFY(empty.first > empty.second);
  }

  void zoomIsClamped() {
    TimeAxis a(10, std::nullopt, 8.0);
    QCOMPARE(a.setPixelsPerFrame(0.01), TimeAxis::kMinPixelsPerFrame);
    QCOMPARE(a.setPixelsPerFrame(1e6), TimeAxis::kMaxPixelsPerFrame);
    QCOMPARE(a.setPixelsPerFrame(std::nan("")), TimeAxis::kMinPixelsPerFrame);
  }

  void clockLabels() {
    TimeAxis a(400, 10.0, 8.0);
    QCOMPARE(a.clockLabel(0), QStringLiteral("0:00"));
    QCOMPARE(a.clockLabel(5), QStringLiteral("0:50"));
    QCOMPARE(a.clockLabel(6), QStringLiteral("1:00"));
    QCOMPARE(a.clockLabel(151), QStringLiteral("25:10"));  // hours keep counting past a day
    TimeAxis b(10, 2.5, 8.0);
    QCOMPARE(b.clockLabel(3), QStringLiteral("0:08"));  // 7.5 min rounds to 8
    TimeAxis unknown(10, std::nullopt, 8.0);
    QVERIFY(unknown.clockLabel(3).isEmpty());
    QVERIFY(!unknown.hoursAt(3).has_value());
    TimeAxis bad(10, -3.0, 8.0);  // a nonsense interval is treated as unknown
    QVERIFY(!bad.intervalMinutes().has_value());
  }

  void ticksFallOnRoundTimes() {
    // 10-minute frames at 8 px: labels 48 px apart need 6 frames, exactly 1 h;
    // 60 px need 7.5 frames, so the next round time, 2 h (12 frames).
    TimeAxis a(240, 10.0, 8.0);
    QCOMPARE(a.majorStepFrames(48), 6);
    QCOMPARE(a.majorStepFrames(60), 12);
    const auto ticks = a.ticks(0, 400, 60);
    QVERIFY(!ticks.empty());
    for (const auto& t : ticks)
      if (t.major) QCOMPARE(t.frame % 12, 0);
    // Zoomed out to 2 px a frame: 30 frames = 5 h is not a round step; 6 h (36 frames) is.
    a.setPixelsPerFrame(2.0);
    QCOMPARE(a.majorStepFrames(60), 36);
    // 7-minute frames: no round time in the list is a whole number of frames,
    // so round frame counts are used.
    TimeAxis odd(500, 7.0, 8.0);
    QCOMPARE(odd.majorStepFrames(60), 10);
    TimeAxis frames(500, std::nullopt, 3.0);
    QCOMPARE(frames.majorStepFrames(60), 20);
  }

  void minorTicksOnlyWithRoom() {
    TimeAxis a(240, 10.0, 12.0);  // major 1 h = 6 frames, minor every 3
    const auto ticks = a.ticks(0, 2000, 60);
    int minor = 0;
    for (const auto& t : ticks) minor += !t.major;
    QVERIFY(minor > 0);
    for (size_t i = 1; i < ticks.size(); ++i) QVERIFY(ticks[i].x - ticks[i - 1].x >= 6.0);
  }

  void lanesStackWithoutOverlap() {
    StripGeometry g(42, QSizeF(48, 72), 48.0);
    QCOMPARE(g.mode(), StripMode::Crops);
    QCOMPARE(g.stripHeight(), 72.0);  // 48 px per frame keeps the 48x72 aspect
    const double lh = 72.0 + StripGeometry::kEventLaneHeight + StripGeometry::kLaneGap;
    QCOMPARE(g.laneHeight(), lh);
    QCOMPARE(g.contentHeight(), 42 * lh);
    QCOMPARE(g.hitAt(0).lane, 0);
    QCOMPARE(g.hitAt(0).part, StripGeometry::Part::Strip);
    QCOMPARE(g.hitAt(72.5).part, StripGeometry::Part::Events);
    QCOMPARE(g.hitAt(lh - 1).part, StripGeometry::Part::Gap);
    QCOMPARE(g.hitAt(lh).lane, 1);
    QCOMPARE(g.hitAt(42 * lh).lane, -1);
    QCOMPARE(g.hitAt(-1).lane, -1);
    QCOMPARE(g.lanesIn(0, lh), std::make_pair(0, 0));
    QCOMPARE(g.lanesIn(lh - 1, lh + 1), std::make_pair(0, 1));
  }

  void compactModeBelowCropThreshold() {
    QCOMPARE(StripGeometry::modeFor(StripGeometry::kCropModeMinPixelsPerFrame), StripMode::Crops);
    QCOMPARE(StripGeometry::modeFor(StripGeometry::kCropModeMinPixelsPerFrame - 0.1),
             StripMode::Kymograph);
    StripGeometry g(10, QSizeF(48, 72), 4.0);
    QCOMPARE(g.mode(), StripMode::Kymograph);
    QCOMPARE(g.stripHeight(), StripGeometry::kKymographHeight);
    // 300 frames at the compact zoom fit in a 1920-px-wide window's strip area.
    TimeAxis a(300, 10.0, 5.0);
    QVERIFY(a.contentWidth() <= 1920 - 200);
  }

  void cropHeightIsClamped() {
    StripGeometry tall(1, QSizeF(48, 72), 160.0);
    QCOMPARE(tall.stripHeight(), StripGeometry::kMaxCropHeight);
    StripGeometry flat(1, QSizeF(96, 24), 20.0);
    QCOMPARE(flat.stripHeight(), StripGeometry::kMinCropHeight);
  }

  void slotRectCombinesAxes() {
    TimeAxis a(100, std::nullopt, 20.0);
    StripGeometry g(3, QSizeF(20, 40), 20.0);
    const QRectF r = g.slotRect(a, 2, 7);
    QCOMPARE(r.left(), 140.0);
    QCOMPARE(r.width(), 20.0);
    QCOMPARE(r.top(), 2 * g.laneHeight());
    QCOMPARE(r.height(), 40.0);
  }

  void measuredCellsBecomeCirclesInCropPixels() {
    using budledger::ui::CellOutline;
    // Two cells as core/engine writes them; 0.25 µm/px, engine crop 3 px right
    // and 2 px down of the view's crop.
    const std::string json =
        R"({"cells":[{"x":10,"y":20,"diameter_um":5,"role":"mother"},)"
        R"({"x":14.5,"y":9,"diameter_um":2,"role":"bud"},{"x":1,"y":1,"diameter_um":0,"role":"other"}]})";
    const auto cells = budledger::ui::cellsFromFeatures(json, 0.25, QPointF(3, 2));
    QCOMPARE(cells.size(), size_t{2});  // a zero-size cell is not drawn
    QCOMPARE(cells[0].centre, QPointF(13, 22));
    QCOMPARE(cells[0].radiusPx, 10.0);  // 5 µm / 0.25 µm/px / 2
    QVERIFY(cells[0].role == CellOutline::Role::Mother);
    QCOMPARE(cells[1].centre, QPointF(17.5, 11));
    QCOMPARE(cells[1].radiusPx, 4.0);
    QVERIFY(cells[1].role == CellOutline::Role::Bud);
    // Unreadable JSON or an unknown pixel size draw nothing rather than guess.
    QVERIFY(budledger::ui::cellsFromFeatures("{not json", 0.25, {}).empty());
    QVERIFY(budledger::ui::cellsFromFeatures(json, 0, {}).empty());
    QVERIFY(budledger::ui::cellsFromFeatures(R"({"informative":false})", 0.25, {}).empty());
  }
};

QTEST_APPLESS_MAIN(GeometryTest)
#include "geometry_test.moc"
