#pragma once
// SurvivalPlot: Kaplan–Meier curves drawn with QPainter from SurvivalCurve
// data — one step curve per group with its confidence band, censor marks,
// the median drawn down to the axis, and a legend with n and the median.
// Groups differ by colour (Okabe–Ito) and by line style, so they read in
// grey too. The picture is rendered once per data or size change into a
// pixmap and blitted on repaint.
#include <QPixmap>
#include <QWidget>
#include <vector>

#include "ui/survival_curve.h"

namespace budledger::ui {

class SurvivalPlot : public QWidget {
  Q_OBJECT

 public:
  explicit SurvivalPlot(QWidget* parent = nullptr);

  void setCurves(std::vector<SurvivalCurve> curves);
  const std::vector<SurvivalCurve>& curves() const { return curves_; }
  void setAxisTitles(QString x, QString y);
  void setNote(QString note);  // a line under the title, e.g. the log-rank result
  // Renders at `size` into `p` (the widget's paint and the docs both use it).
  void render(QPainter& p, QSize size) const;
  // Where (x, survival) lands when rendered at `size`: the same mapping
  // render() uses, for hover read-outs and tests.
  QPointF toPixel(QSize size, double x, double survival) const;
  QSize sizeHint() const override { return {420, 300}; }
  QSize minimumSizeHint() const override { return {240, 180}; }

 protected:
  void paintEvent(QPaintEvent* event) override;
  void resizeEvent(QResizeEvent* event) override;

 private:
  std::vector<SurvivalCurve> curves_;
  QString xTitle_, yTitle_, note_;
  struct Frame {
    QRectF plot;
    double xMax = 1;
    double xStep = 1;
  };
  Frame frameFor(QSize size, const QFontMetrics& fm) const;
  mutable QPixmap cache_;
};

}  // namespace budledger::ui
