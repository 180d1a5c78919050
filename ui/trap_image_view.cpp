#include "ui/trap_image_view.h"

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

void TrapImageView::showFrame(TrapId trap, int frame) {
  trap_ = trap;
  frame_ = frame;
  cells_.clear();
  update();
}

void TrapImageView::setCells(std::vector<CellOutline> cells) {
  cells_ = std::move(cells);
  update();
}

void TrapImageView::onReady(const ThumbnailKey& key) {
  if (trap_ && key.trap == *trap_ && key.frame == frame_ && key.kind == ThumbnailKind::Crop)
    update();
}

QString TrapImageView::caption() const {
  if (!trap_ || !session_) return tr("No trap selected");
  QString text =
      tr("Position %1, trap %2, frame %3").arg(trap_->position).arg(trap_->trap).arg(frame_);
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
    QPolygonF poly;
    for (const QPointF& pt : c.outline)
      poly << QPointF(target.left() + (pt.x() + 0.5) * s, target.top() + (pt.y() + 0.5) * s);
    const QColor colour = c.role == CellOutline::Role::Mother ? glyphs::kindColour(EventKind::Death)
                          : c.role == CellOutline::Role::Bud  ? glyphs::kindColour(EventKind::Bud)
                                                              : QColor(0x56, 0xB4, 0xE9);
    // Dashes for buds and others, solid for the mother: tells roles apart without colour.
    p.setPen(QPen(Qt::white, 3.5));
    p.setBrush(Qt::NoBrush);
    p.drawPolygon(poly);
    p.setPen(QPen(colour, 2.0, c.role == CellOutline::Role::Mother ? Qt::SolidLine : Qt::DashLine));
    p.drawPolygon(poly);
  }
  p.setPen(QPen(QColor(0x88, 0x88, 0x88), 1));
  p.setBrush(Qt::NoBrush);
  p.drawRect(target.adjusted(-0.5, -0.5, 0.5, 0.5));
}

}  // namespace budledger::ui
