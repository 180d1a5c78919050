// The thumbnail machinery: LRU eviction under a memory cap, display levels,
// the kymograph profile, and asynchronous loading with stale images kept
// while new levels are applied.
#include <QSignalSpy>
#include <QtTest>
#include <atomic>

#include "ui/display_levels.h"
#include "ui/thumbnail_cache.h"
#include "ui/thumbnail_loader.h"

using namespace budledger::ui;

namespace {

// Crops whose pixel value encodes the frame, so a test can tell which frame it got.
class CountingSource : public CropSource {
 public:
  QSize cropSize() const override { return {12, 20}; }
  QImage crop(TrapId trap, int frame) const override {
    ++calls;
    if (trap.trap == 99) throw std::runtime_error("stack.tif: frame unreadable");
    QImage img(cropSize(), QImage::Format_Grayscale8);
    img.fill(static_cast<uint>(frame % 256));
    // A bright band along the middle rows, for the profile test.
    for (int x = 0; x < img.width(); ++x) img.scanLine(10)[x] = 250;
    return img;
  }
  mutable std::atomic<int> calls{0};
};

QImage grey(int w, int h, int value) {
  QImage img(w, h, QImage::Format_Grayscale8);
  img.fill(static_cast<uint>(value));
  return img;
}

}  // namespace

class ThumbnailTest : public QObject {
  Q_OBJECT

 private slots:
  void cacheEvictsLeastRecentlyUsed() {
    const qint64 each = grey(10, 10, 0).sizeInBytes();
    ThumbnailCache cache(3 * each);
    auto key = [](int f) { return ThumbnailKey{{1, 1}, f, QSize(10, 10), ThumbnailKind::Crop}; };
    for (int f = 0; f < 3; ++f) cache.insert(key(f), grey(10, 10, f), 1);
    QCOMPARE(cache.count(), 3);
    QVERIFY(cache.find(key(0)));  // 0 is now the most recent
    cache.insert(key(3), grey(10, 10, 3), 1);
    QCOMPARE(cache.count(), 3);
    QVERIFY(cache.bytes() <= cache.cap());
    QVERIFY(cache.find(key(0)));
    QVERIFY(!cache.find(key(1)));  // the least recently used went
    QVERIFY(cache.find(key(2)));
    cache.setCap(each);
    QCOMPARE(cache.count(), 1);
    // Replacing an entry does not double-count its bytes.
    cache.insert(key(7), grey(10, 10, 1), 1);
    cache.insert(key(7), grey(10, 10, 2), 2);
    QCOMPARE(cache.bytes(), each);
    QCOMPARE(cache.find(key(7))->levelsStamp, 2);
  }

  void keysDifferBySizeAndKind() {
    ThumbnailCache cache(1 << 20);
    const ThumbnailKey a{{1, 2}, 5, QSize(10, 10), ThumbnailKind::Crop};
    ThumbnailKey b = a;
    b.size = QSize(20, 20);
    ThumbnailKey c = a;
    c.kind = ThumbnailKind::KymographTile;
    ThumbnailKey d = a;
    d.trap.position = 2;
    cache.insert(a, grey(10, 10, 1), 1);
    QVERIFY(cache.find(a));
    QVERIFY(!cache.find(b));
    QVERIFY(!cache.find(c));
    QVERIFY(!cache.find(d));
  }

  void levelsMapBlackAndWhite() {
    QImage img(3, 1, QImage::Format_Grayscale16);
    auto* row = reinterpret_cast<quint16*>(img.scanLine(0));
    row[0] = 16384, row[1] = 32768, row[2] = 49152;  // quarter, half, three quarters
    const QImage out = applyLevels(img, {0.25, 0.75});
    QCOMPARE(out.format(), QImage::Format_Grayscale8);
    QCOMPARE(int(out.constScanLine(0)[0]), 0);
    QVERIFY(std::abs(int(out.constScanLine(0)[1]) - 128) <= 1);
    QCOMPARE(int(out.constScanLine(0)[2]), 255);
    QVERIFY(applyLevels(QImage(), {}).isNull());
  }

  void autoLevelsIgnoreOutliers() {
    // 1000 pixels at 100 plus 2 hot pixels at 255: the 99.5th percentile stays near 100.
    QImage img(1002, 1, QImage::Format_Grayscale8);
    img.fill(100u);
    img.scanLine(0)[0] = 255;
    img.scanLine(0)[1] = 0;
    const DisplayLevels lv = autoLevels(img);
    QVERIFY(lv.black > 0.35 && lv.black < 0.40);  // ~100/255
    QVERIFY(lv.white > 0.39 && lv.white < 0.41);
    QVERIFY(lv.white > lv.black);
  }

  void brightnessContrastRoundTrip() {
    const DisplayLevels lv = DisplayLevels::fromBrightnessContrast(0.5, 2.0);
    QCOMPARE(lv.black, 0.25);
    QCOMPARE(lv.white, 0.75);
    QCOMPARE(lv.contrast(), 2.0);
    QCOMPARE(lv.brightness(), 0.5);
    // A window pushed past the end is slid back inside [0, 1].
    const DisplayLevels edge = DisplayLevels::fromBrightnessContrast(0.0, 4.0);
    QCOMPARE(edge.white, 1.0);
    QCOMPARE(edge.black, 0.75);
  }

  void kymographColumnIsTheAxisProfile() {
    CountingSource src;
    const ThumbnailKey key{{1, 1}, 10, QSize(4, 20), ThumbnailKind::KymographTile};
    const QImage tile = ThumbnailLoader::render(src, key, {});
    QCOMPARE(tile.size(), QSize(4, 20));
    for (int i = 0; i < 4; ++i) {
      QCOMPARE(int(tile.pixel(i, 0) & 0xFF), 10 + i);  // column i is frame 10 + i
      QCOMPARE(int(tile.pixel(i, 10) & 0xFF), 250);    // the bright band on the axis
    }
    QCOMPARE(src.calls.load(), 4);
  }

  void loadsAsynchronouslyWithPlaceholderFirst() {
    auto src = std::make_shared<CountingSource>();
    ThumbnailLoader loader(src, {1 << 20, 2});
    QSignalSpy ready(&loader, &ThumbnailLoader::ready);
    const ThumbnailKey key{{1, 1}, 3, QSize(12, 20), ThumbnailKind::Crop};
    bool fresh = true;
    QVERIFY(loader.fetch(key, &fresh).isNull());  // nothing yet: the caller paints a placeholder
    QVERIFY(!fresh);
    loader.fetch(key);  // asking again does not queue a second job
    loader.waitForIdle();
    QCOMPARE(ready.count(), 1);
    QCOMPARE(src->calls.load(), 1);
    const QImage img = loader.fetch(key, &fresh);
    QVERIFY(fresh);
    QCOMPARE(int(img.pixel(0, 0) & 0xFF), 3);
  }

  void newLevelsKeepTheStaleImageUntilReplaced() {
    auto src = std::make_shared<CountingSource>();
    ThumbnailLoader loader(src, {1 << 20, 1});
    const ThumbnailKey key{{1, 1}, 100, QSize(12, 20), ThumbnailKind::Crop};
    loader.fetch(key);
    loader.waitForIdle();
    loader.setLevels({0.0, 0.5});
    bool fresh = true;
    const QImage stale = loader.fetch(key, &fresh);
    QVERIFY(!stale.isNull());  // still something to paint
    QVERIFY(!fresh);
    QCOMPARE(int(stale.pixel(0, 0) & 0xFF), 100);
    loader.waitForIdle();
    const QImage renewed = loader.fetch(key, &fresh);
    QVERIFY(fresh);
    QCOMPARE(int(renewed.pixel(0, 0) & 0xFF), 200);  // 100 on a 0..0.5 window doubles
  }

  void unreadableCropIsReportedOnce() {
    auto src = std::make_shared<CountingSource>();
    ThumbnailLoader loader(src, {1 << 20, 1});
    QSignalSpy failed(&loader, &ThumbnailLoader::failed);
    for (int f = 0; f < 3; ++f) loader.fetch({{1, 99}, f, QSize(12, 20), ThumbnailKind::Crop});
    loader.waitForIdle();
    QCOMPARE(failed.count(), 1);
    QVERIFY(failed.first().first().toString().contains(QStringLiteral("stack.tif")));
  }

  void oldRequestsAreDroppedWhenScrolledAway() {
    // Slow crops: while the first is being made, the view moves on by two passes.
    class Slow : public CountingSource {
     public:
      QImage crop(TrapId t, int f) const override {
        QThread::msleep(30);
        return CountingSource::crop(t, f);
      }
    };
    auto src = std::make_shared<Slow>();
    ThumbnailLoader loader(src, {1 << 20, 1});
    loader.beginPass();
    for (int f = 0; f < 10; ++f) loader.fetch({{1, 1}, f, QSize(12, 20), ThumbnailKind::Crop});
    loader.beginPass();
    loader.beginPass();
    loader.fetch({{1, 1}, 50, QSize(12, 20), ThumbnailKind::Crop});
    loader.waitForIdle();
    // At most the job already running when the user scrolled on, plus the new one.
    QVERIFY(src->calls.load() <= 3);
    QVERIFY(!loader.fetch({{1, 1}, 50, QSize(12, 20), ThumbnailKind::Crop}).isNull());
  }
};

QTEST_MAIN(ThumbnailTest)
#include "thumbnail_test.moc"
