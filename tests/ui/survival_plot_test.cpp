// SurvivalPlot draws what it is given: the step curve where the data put it,
// the confidence band around it, censor marks, the median drop line, and
// nothing broken on degenerate input. Curves are hand-made step data.
#include <QPainter>
#include <QtTest>

#include "ui/survival_plot.h"

using namespace budledger::ui;

namespace {

// Two groups: A halves at 10 divisions and ends at 0.25 at 20; B stays at 1
// until 15, then drops to 0.6 (median not reached).
std::vector<SurvivalCurve> twoGroups() {
  SurvivalCurve a;
  a.label = QStringLiteral("control");
  a.subjects = 4;
  a.events = 3;
  a.steps = {{0, 1, 1, 1}, {10, 0.5, 0.2, 0.8}, {20, 0.25, 0.05, 0.6}};
  a.censored = {{14, 0.5, 1}};
  a.lastX = 24;
  a.median = 10;
  SurvivalCurve b;
  b.label = QStringLiteral("long-lived");
  b.subjects = 5;
  b.events = 2;
  b.steps = {{0, 1, 1, 1}, {15, 0.6, 0.3, 0.9}};
  b.lastX = 30;
  return {a, b};
}

QImage renderAt(const SurvivalPlot& plot, QSize size) {
  QImage img(size, QImage::Format_RGB32);
  img.fill(Qt::white);
  QPainter p(&img);
  plot.render(p, size);
  return img;
}

bool near(QColor a, QColor b, int tol = 40) {
  return std::abs(a.red() - b.red()) + std::abs(a.green() - b.green()) +
             std::abs(a.blue() - b.blue()) <=
         tol;
}

}  // namespace

class SurvivalPlotTest : public QObject {
  Q_OBJECT

 private slots:
  void curveIsDrawnWhereTheStepsAre() {
    SurvivalPlot plot;
    plot.setCurves(twoGroups());
    const QSize size(600, 400);
    const QImage img = renderAt(plot, size);
    // For a look at the picture: BUDLEDGER_PLOT_PNG=/path/plot.png test_survival_plot
    if (qEnvironmentVariableIsSet("BUDLEDGER_PLOT_PNG"))
      img.save(qEnvironmentVariable("BUDLEDGER_PLOT_PNG"));
    const QColor first(0x00, 0x72, 0xB2);  // the first group's colour (Okabe–Ito blue)
    // Before the first step the curve runs at survival 1; after it at 0.5.
    const QPoint onTop = plot.toPixel(size, 5, 1.0).toPoint();
    const QPoint onHalf = plot.toPixel(size, 12, 0.5).toPoint();
    QVERIFY(near(img.pixelColor(onTop), first) ||
            near(img.pixelColor(onTop + QPoint(0, 1)), first));
    QVERIFY(near(img.pixelColor(onHalf), first) ||
            near(img.pixelColor(onHalf + QPoint(0, 1)), first));
    // Inside the band (between 0.2 and 0.8 at x = 12) the fill is tinted, not white.
    const QPoint inBand = plot.toPixel(size, 12, 0.7).toPoint();
    QVERIFY(img.pixelColor(inBand) != QColor(Qt::white));
    // Well above the band at x = 12 (survival 0.95) is plain background or grid.
    const QColor above = img.pixelColor(plot.toPixel(size, 12, 0.95).toPoint());
    QVERIFY(above.red() > 200 && above.green() > 200 && above.blue() > 200);
  }

  void medianLineDropsToTheAxis() {
    SurvivalPlot plot;
    plot.setCurves(twoGroups());
    const QSize size(600, 400);
    const QImage img = renderAt(plot, size);
    // The dashed drop from (10, 0.5) to the axis: some pixel of it at survival 0.25..0.05 is
    // coloured.
    int hits = 0;
    for (double s = 0.05; s < 0.45; s += 0.01) {
      const QPoint at = plot.toPixel(size, 10, s).toPoint();
      for (int dx = -1; dx <= 1; ++dx)
        if (near(img.pixelColor(at + QPoint(dx, 0)), QColor(0x00, 0x72, 0xB2), 90)) {
          ++hits;
          break;
        }
    }
    QVERIFY(hits > 10);
  }

  void degenerateInputDoesNotBreak() {
    SurvivalPlot plot;
    renderAt(plot, {400, 300});  // no curves
    SurvivalCurve empty;
    empty.label = QStringLiteral("empty");
    plot.setCurves({empty});
    renderAt(plot, {400, 300});
    SurvivalCurve flat;
    flat.steps = {{0, 1, 1, 1}};
    plot.setCurves({flat});
    renderAt(plot, {400, 300});
    renderAt(plot, {20, 10});  // too small to draw a frame
    QCOMPARE(plot.curves().size(), size_t(1));
  }
};

QTEST_MAIN(SurvivalPlotTest)
#include "survival_plot_test.moc"
