#include "ui/survival_plot.h"

#include <QPainter>
#include <QPainterPath>
#include <algorithm>
#include <cmath>

namespace budledger::ui {

namespace {

const QColor kGroupColours[] = {QColor(0x00, 0x72, 0xB2), QColor(0xD5, 0x5E, 0x00),
                                QColor(0x00, 0x9E, 0x73), QColor(0xCC, 0x79, 0xA7),
                                QColor(0xE6, 0x9F, 0x00), QColor(0x56, 0xB4, 0xE9)};
const Qt::PenStyle kGroupStyles[] = {Qt::SolidLine,   Qt::DashLine,       Qt::DotLine,
                                     Qt::DashDotLine, Qt::DashDotDotLine, Qt::SolidLine};

double niceStep(double range, int targetTicks) {
  const double raw = range / std::max(1, targetTicks);
  const double mag = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * mag >= raw) return m * mag;
  return 10 * mag;
}

}  // namespace

SurvivalPlot::SurvivalPlot(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("survivalPlot"));
  xTitle_ = tr("Divisions (replicative age)");
  yTitle_ = tr("Fraction alive");
}

void SurvivalPlot::setCurves(std::vector<SurvivalCurve> curves) {
  curves_ = std::move(curves);
  cache_ = QPixmap();
  update();
}

void SurvivalPlot::setAxisTitles(QString x, QString y) {
  xTitle_ = std::move(x);
  yTitle_ = std::move(y);
  cache_ = QPixmap();
  update();
}

void SurvivalPlot::setNote(QString note) {
  note_ = std::move(note);
  cache_ = QPixmap();
  update();
}

void SurvivalPlot::resizeEvent(QResizeEvent*) { cache_ = QPixmap(); }

void SurvivalPlot::paintEvent(QPaintEvent*) {
  const qreal dpr = devicePixelRatioF();
  if (cache_.isNull() || cache_.size() != size() * dpr) {
    cache_ = QPixmap(size() * dpr);
    cache_.setDevicePixelRatio(dpr);
    cache_.fill(palette().color(QPalette::Base));
    QPainter cp(&cache_);
    render(cp, size());
  }
  QPainter p(this);
  p.drawPixmap(0, 0, cache_);
}

SurvivalPlot::Frame SurvivalPlot::frameFor(QSize size, const QFontMetrics& fm) const {
  Frame f;
  const int left = fm.horizontalAdvance(QStringLiteral("0.00")) + fm.height() + 12;
  const int top = 10 + (note_.isEmpty() ? 0 : fm.height() + 4);
  // Under the axis title: one legend row per group, so the key never covers a curve.
  const int legend = static_cast<int>(curves_.size()) * (fm.height() + 2) + 4;
  const int bottom = 2 * fm.height() + 12 + legend;
  f.plot = QRectF(left, top, size.width() - left - 14, size.height() - top - bottom);
  double xMax = 1;
  for (const auto& c : curves_) {
    xMax = std::max(xMax, c.lastX);
    if (!c.steps.empty()) xMax = std::max(xMax, c.steps.back().x);
  }
  f.xStep = niceStep(xMax, std::max(2, static_cast<int>(f.plot.width() / 70)));
  f.xMax = std::ceil(xMax / f.xStep) * f.xStep;
  return f;
}

QPointF SurvivalPlot::toPixel(QSize size, double x, double survival) const {
  const Frame f = frameFor(size, QFontMetrics(font()));
  return {f.plot.left() + x / f.xMax * f.plot.width(),
          f.plot.bottom() - std::clamp(survival, 0.0, 1.0) * f.plot.height()};
}

void SurvivalPlot::render(QPainter& p, QSize size) const {
  p.save();
  p.setRenderHint(QPainter::Antialiasing);
  p.setFont(font());
  const QFontMetrics fm(p.font());
  const QColor ink(0x22, 0x22, 0x22);
  const Frame f = frameFor(size, fm);
  const QRectF plot = f.plot;
  const int left = static_cast<int>(plot.left());
  if (!note_.isEmpty()) {
    p.setPen(ink);
    const int room = std::max(0, size.width() - left - 4);
    p.drawText(QRectF(left, 4, room, fm.height()), Qt::AlignLeft,
               fm.elidedText(note_, Qt::ElideRight, room));
  }
  if (plot.width() < 40 || plot.height() < 40) {
    p.restore();
    return;
  }
  const double xMax = f.xMax, xStep = f.xStep;
  auto X = [&](double x) { return plot.left() + x / xMax * plot.width(); };
  auto Y = [&](double s) { return plot.bottom() - std::clamp(s, 0.0, 1.0) * plot.height(); };

  // Grid and axes.
  p.setPen(QPen(QColor(0xE2, 0xE2, 0xE2), 1));
  for (int i = 0; i <= 4; ++i)
    p.drawLine(QPointF(plot.left(), Y(i / 4.0)), QPointF(plot.right(), Y(i / 4.0)));
  for (double x = 0; x <= xMax + 1e-9; x += xStep)
    p.drawLine(QPointF(X(x), plot.top()), QPointF(X(x), plot.bottom()));
  p.setPen(QPen(ink, 1.2));
  p.drawLine(plot.bottomLeft(), plot.bottomRight());
  p.drawLine(plot.bottomLeft(), plot.topLeft());
  for (int i = 0; i <= 4; ++i) {
    const QString label = QString::number(i / 4.0, 'f', 2);
    p.drawText(QRectF(0, Y(i / 4.0) - fm.height() / 2.0, left - 6, fm.height()),
               Qt::AlignRight | Qt::AlignVCenter, label);
  }
  for (double x = 0; x <= xMax + 1e-9; x += xStep)
    p.drawText(QRectF(X(x) - 30, plot.bottom() + 4, 60, fm.height()), Qt::AlignHCenter,
               QString::number(x, 'g', 4));
  p.drawText(QRectF(plot.left(), plot.bottom() + 6 + fm.height(), plot.width(), fm.height()),
             Qt::AlignHCenter, xTitle_);
  p.save();
  p.translate(fm.height() / 2.0 + 2, plot.center().y());
  p.rotate(-90);
  p.drawText(QRectF(-plot.height() / 2, -fm.height() / 2.0, plot.height(), fm.height()),
             Qt::AlignCenter, yTitle_);
  p.restore();

  if (curves_.empty()) {
    p.setPen(QColor(0x66, 0x66, 0x66));
    p.drawText(plot, Qt::AlignCenter, tr("No lifespans yet"));
    p.restore();
    return;
  }

  p.setClipRect(plot.adjusted(-2, -2, 2, 2));
  for (size_t gi = 0; gi < curves_.size(); ++gi) {
    const auto& c = curves_[gi];
    if (c.steps.empty()) continue;
    const QColor colour = kGroupColours[gi % std::size(kGroupColours)];
    const double endX = std::max(c.lastX, c.steps.back().x);
    // Confidence band: the region between the step functions of lower and upper.
    QPolygonF band;
    for (size_t i = 0; i < c.steps.size(); ++i) {
      const double x1 = i + 1 < c.steps.size() ? c.steps[i + 1].x : endX;
      band << QPointF(X(c.steps[i].x), Y(c.steps[i].upper)) << QPointF(X(x1), Y(c.steps[i].upper));
    }
    for (size_t i = c.steps.size(); i-- > 0;) {
      const double x1 = i + 1 < c.steps.size() ? c.steps[i + 1].x : endX;
      band << QPointF(X(x1), Y(c.steps[i].lower)) << QPointF(X(c.steps[i].x), Y(c.steps[i].lower));
    }
    QColor fill = colour;
    fill.setAlpha(45);
    p.setPen(Qt::NoPen);
    p.setBrush(fill);
    p.drawPolygon(band);
    // The curve itself.
    QPainterPath path(QPointF(X(c.steps[0].x), Y(c.steps[0].survival)));
    for (size_t i = 1; i < c.steps.size(); ++i) {
      path.lineTo(X(c.steps[i].x), Y(c.steps[i - 1].survival));
      path.lineTo(X(c.steps[i].x), Y(c.steps[i].survival));
    }
    path.lineTo(X(endX), Y(c.steps.back().survival));
    p.setBrush(Qt::NoBrush);
    p.setPen(QPen(colour, 2.2, kGroupStyles[gi % std::size(kGroupStyles)], Qt::FlatCap));
    p.drawPath(path);
    // Censor marks: short vertical ticks across the curve.
    p.setPen(QPen(colour.darker(115), 1.6));
    for (const auto& m : c.censored) {
      const QPointF at(X(m.x), Y(m.survival));
      p.drawLine(at + QPointF(0, -5), at + QPointF(0, 5));
    }
    // Median: across from 0.5 to the curve, then down to the axis.
    if (c.median) {
      p.setPen(QPen(colour, 1.2, Qt::DashLine));
      p.drawLine(QPointF(plot.left(), Y(0.5)), QPointF(X(*c.median), Y(0.5)));
      p.drawLine(QPointF(X(*c.median), Y(0.5)), QPointF(X(*c.median), plot.bottom()));
    }
  }
  p.setClipping(false);

  // Legend under the axis title: line sample, label, n, median.
  const double legendTop = plot.bottom() + 2 * fm.height() + 12;
  for (size_t i = 0; i < curves_.size(); ++i) {
    const auto& c = curves_[i];
    QString med = c.median ? QString::number(*c.median, 'g', 4) : tr("not reached");
    if (c.median && c.medianLower && c.medianUpper)
      med += tr(" (95% CI %1–%2)").arg(*c.medianLower, 0, 'g', 4).arg(*c.medianUpper, 0, 'g', 4);
    const QString row = tr("%1: n = %2, %3 died, median %4")
                            .arg(c.label.isEmpty() ? tr("(no group)") : c.label)
                            .arg(c.subjects)
                            .arg(c.events)
                            .arg(med);
    const double y = legendTop + static_cast<double>(i) * (fm.height() + 2) + fm.height() / 2.0;
    const QColor colour = kGroupColours[i % std::size(kGroupColours)];
    p.setPen(QPen(colour, 2.2, kGroupStyles[i % std::size(kGroupStyles)]));
    // The key starts at the widget's edge, not the plot's, so a narrow dock
    // still has room; what does not fit is elided rather than cut.
    const double x0 = 6;
    p.drawLine(QPointF(x0, y), QPointF(x0 + 28, y));
    p.setPen(ink);
    const int room = std::max(0, size.width() - static_cast<int>(x0) - 40);
    p.drawText(QRectF(x0 + 34, y - fm.height() / 2.0, room, fm.height()),
               Qt::AlignVCenter | Qt::AlignLeft, fm.elidedText(row, Qt::ElideRight, room));
  }
  p.restore();
}

}  // namespace budledger::ui
