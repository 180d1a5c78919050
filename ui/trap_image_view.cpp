#include "ui/trap_image_view.h"

#include <nlohmann/json.hpp>

#include <QPaintEvent>
#include <QPainter>
#include <algorithm>
#include <cmath>

#include "ui/counted.h"
#include "ui/event_glyphs.h"

namespace budledger::ui {

namespace {
constexpr int kCaptionLines = 2;
}

TrapImageView::TrapImageView(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("trapImage"));
  setMinimumSize(180, 220);
}

void TrapImageView::setLoader(ThumbnailLoader* loader) {
  if (loader_) disconnect(loader_, nullptr, this, nullptr);
  loader_ = loader;
  if (loader_) connect(loader_, &ThumbnailLoader::ready, this, &TrapImageView::onReady);
  update();
}

std::vector<CellOutline> cellsFromFeatures(const std::string& featuresJson, double pixelUm,
                                           QPointF origin) {
  std::vector<CellOutline> out;
  if (!(pixelUm > 0)) return out;
  try {
    const auto j = nlohmann::json::parse(featuresJson);
    if (!j.contains("cells")) return out;
    for (const auto& c : j["cells"]) {
      CellOutline cell;
      cell.centre = QPointF(c.value("x", 0.0), c.value("y", 0.0)) + origin;
      cell.radiusPx = c.value("diameter_um", 0.0) / pixelUm / 2.0;
      const std::string role = c.value("role", std::string());
      cell.role = role == "mother" ? CellOutline::Role::Mother
                  : role == "bud"  ? CellOutline::Role::Bud
                                   : CellOutline::Role::Other;
      if (cell.radiusPx > 0) out.push_back(cell);
    }
  } catch (const std::exception&) {
    // A reading the workstation cannot parse shows no outlines rather than a wrong one.
    out.clear();
  }
  return out;
}

void TrapImageView::showFrame(TrapId trap, int frame) {
  trap_ = trap;
  frame_ = frame;
  cells_.clear();
  if (session_) {
    const auto um = session_->pixelUm(trap.position);
    const QPointF origin = loader_ && loader_->source()
                               ? loader_->source()->measurementOrigin(trap.position)
                               : QPointF();
    for (const auto& m : session_->measurements(trap))
      if (m.frame == frame && um) {
        cells_ = cellsFromFeatures(m.featuresJson, *um, origin);
        break;
      }
  }
  update();
}

void TrapImageView::onReady(const ThumbnailKey& key) {
  if (trap_ && key.trap == *trap_ && key.frame == frame_ && key.kind == ThumbnailKind::Crop)
    update();
}

QString TrapImageView::caption() const {
  if (!trap_ || !session_) return tr("No trap selected");
  const auto* pos = session_->position(trap_->position);
  QString text =
      tr("%1, trap %2, frame %3")
          .arg(pos ? QString::fromStdString(pos->name) : QString::number(trap_->position))
          .arg(trap_->trap)
          .arg(frame_);
  // The engine's reading of this frame, when it has one.
  for (const auto& m : session_->measurements(*trap_)) {
    if (m.frame != frame_) continue;
    const double p = std::max({m.pEmpty, m.pSingle, m.pBudded, m.pCrowded});
    text += tr("\nEngine: %1 (p %2), %3")
                .arg(QString::fromStdString(std::string(toString(m.occupancy))))
                .arg(p, 0, 'f', 2)
                .arg(counted(m.cellCount, tr("%1 cell"), tr("%1 cells")));
    break;
  }
  return text;
}

QRectF TrapImageView::imageRect() const {
  const QFontMetrics fm(font());
  const QRectF area(6, 6, width() - 12, height() - 12 - kCaptionLines * fm.height() - 6);
  if (!loader_ || !loader_->source() || area.isEmpty()) return area;
  const QSizeF crop = loader_->source()->cropSize();
  const double s = std::min(area.width() / crop.width(), area.height() / crop.height());
  const QSizeF size(crop.width() * s, crop.height() * s);
  return {area.center().x() - size.width() / 2, area.top(), size.width(), size.height()};
}

void TrapImageView::paintEvent(QPaintEvent*) {
  QPainter p(this);
  p.fillRect(rect(), palette().color(QPalette::Window));
  const QRectF target = imageRect();
  const QFontMetrics fm(font());
  const QRectF captionRect(6, height() - 6 - kCaptionLines * fm.height(), width() - 12,
                           kCaptionLines * fm.height());
  p.setPen(palette().color(QPalette::WindowText));
  p.drawText(captionRect, Qt::AlignLeft | Qt::AlignTop | Qt::TextWordWrap, caption());
  if (!trap_) return;
  if (!loader_ || !loader_->source()) {
    p.fillRect(target, QColor(0xD4, 0xD4, 0xD4));
    p.setPen(QColor(0x44, 0x44, 0x44));
    p.drawText(target, Qt::AlignCenter | Qt::TextWordWrap, tr("Images not available"));
    return;
  }
  const QSize native = loader_->source()->cropSize();
  const QImage img = loader_->fetch({*trap_, frame_, native, ThumbnailKind::Crop});
  if (img.isNull()) {
    p.fillRect(target, QColor(0xD4, 0xD4, 0xD4));
    p.setPen(QColor(0x44, 0x44, 0x44));
    p.drawText(target, Qt::AlignCenter, tr("Loading…"));
    return;
  }
  // Real pixels when enlarged: no smoothing.
  p.setRenderHint(QPainter::SmoothPixmapTransform, target.width() < native.width());
  p.drawImage(target, img);
  const double s = target.width() / native.width();
  p.setRenderHint(QPainter::Antialiasing);
  for (const auto& c : cells_) {
    const QPointF at(target.left() + c.centre.x() * s, target.top() + c.centre.y() * s);
    const double r = c.radiusPx * s;
    const QColor colour = c.role == CellOutline::Role::Mother ? glyphs::kindColour(EventKind::Death)
                          : c.role == CellOutline::Role::Bud  ? glyphs::kindColour(EventKind::Bud)
                                                              : QColor(0x56, 0xB4, 0xE9);
    // Solid for the mother, dashed for buds, dotted for others: roles read without colour.
    const Qt::PenStyle style = c.role == CellOutline::Role::Mother ? Qt::SolidLine
                               : c.role == CellOutline::Role::Bud  ? Qt::DashLine
                                                                   : Qt::DotLine;
    p.setBrush(Qt::NoBrush);
    p.setPen(QPen(Qt::white, 4.0));
    p.drawEllipse(at, r, r);
    p.setPen(QPen(colour, 2.2, style));
    p.drawEllipse(at, r, r);
  }
  p.setPen(QPen(QColor(0x88, 0x88, 0x88), 1));
  p.setBrush(Qt::NoBrush);
  p.drawRect(target.adjusted(-0.5, -0.5, 0.5, 0.5));
}

}  // namespace budledger::ui
