#include "ui/time_strip_view.h"

#include <QHelpEvent>
#include <QMouseEvent>
#include <QPainter>
#include <QScrollBar>
#include <QToolTip>
#include <QWheelEvent>
#include <algorithm>
#include <cmath>

#include "ui/event_glyphs.h"
#include "ui/lane_label_column.h"
#include "ui/time_axis_header.h"

namespace budledger::ui {

namespace {
const QColor kBackground(0xEE, 0xEE, 0xEE);
const QColor kEventLane(0xFA, 0xFA, 0xFA);
const QColor kCurrentLane(0xFF, 0xF6, 0xCC);
const QColor kPlaceholder(0xD4, 0xD4, 0xD4);
const QColor kAfterEnd(0xC8, 0xC8, 0xC8);

int roundUpTo(double v, int step) {
  return std::max(step, static_cast<int>(std::ceil(v / step)) * step);
}
}  // namespace

TimeStripView::TimeStripView(QWidget* parent) : QAbstractScrollArea(parent) {
  setObjectName(QStringLiteral("timeStrips"));
  setFocusPolicy(Qt::StrongFocus);
  viewport()->setMouseTracking(true);
  viewport()->setAttribute(Qt::WA_OpaquePaintEvent);
  setViewportMargins(kLabelWidth, kAxisHeight, 0, 0);
  header_ = new TimeAxisHeader(this);
  labels_ = new LaneLabelColumn(this);
  horizontalScrollBar()->setSingleStep(8);
  axis_.setPixelsPerFrame(6.0);
  relayout();
}

TimeStripView::~TimeStripView() = default;

void TimeStripView::setSession(ReviewSession* session) {
  if (session_) disconnect(session_, nullptr, this, nullptr);
  session_ = session;
  if (session_) connect(session_, &ReviewSession::trapChanged, this, &TimeStripView::onTrapChanged);
  lanes_.clear();
  cursorLane_ = cursorFrame_ = 0;
  selected_.reset();
  relayout();
}

void TimeStripView::setLoader(ThumbnailLoader* loader) {
  if (loader_) disconnect(loader_, nullptr, this, nullptr);
  loader_ = loader;
  cropSize_ = loader_ && loader_->source() ? loader_->source()->cropSize() : QSize();
  if (loader_) connect(loader_, &ThumbnailLoader::ready, this, &TimeStripView::onThumbnailReady);
  relayout();
}

void TimeStripView::setLanes(int position, std::vector<TrapId> lanes) {
  position_ = position;
  lanes_ = std::move(lanes);
  if (session_) {
    axis_.setFrameCount(session_->frameCount(position));
    axis_.setIntervalMinutes(session_->intervalMinutes());
  }
  cursorLane_ = std::clamp(cursorLane_, 0, std::max(0, static_cast<int>(lanes_.size()) - 1));
  cursorFrame_ = axis_.clampFrame(cursorFrame_);
  relayout();
  if (auto t = currentTrap()) emit cursorChanged(*t, cursorFrame_);
}

std::optional<TrapId> TimeStripView::currentTrap() const {
  if (lanes_.empty()) return std::nullopt;
  return lanes_[static_cast<size_t>(cursorLane_)];
}

const ReviewEvent* TimeStripView::eventAtCursor() const {
  auto t = currentTrap();
  if (!t || !session_) return nullptr;
  const ReviewEvent* best = nullptr;
  for (const auto& e : session_->events(*t)) {
    if (e.event.frame != cursorFrame_) continue;
    // Prefer the selected one, then one that still counts.
    if (selected_ && e.event.id == *selected_) return &e;
    if (!best || (!best->counts() && e.counts())) best = &e;
  }
  return best;
}

void TimeStripView::relayout() {
  geometry_ =
      StripGeometry(static_cast<int>(lanes_.size()), QSizeF(cropSize_), axis_.pixelsPerFrame());
  updateScrollBars();
  const QRect cr = contentsRect();
  header_->setGeometry(cr.left(), cr.top(), cr.width(), kAxisHeight);
  labels_->setGeometry(cr.left(), cr.top() + kAxisHeight, kLabelWidth,
                       std::max(0, cr.height() - kAxisHeight));
  viewport()->update();
  header_->update();
  labels_->update();
}

void TimeStripView::updateScrollBars() {
  const QSize vp = viewport()->size();
  auto* h = horizontalScrollBar();
  h->setRange(0, std::max(0, static_cast<int>(std::ceil(axis_.contentWidth())) - vp.width()));
  h->setPageStep(std::max(1, vp.width()));
  h->setSingleStep(std::max(4, static_cast<int>(axis_.pixelsPerFrame())));
  auto* v = verticalScrollBar();
  v->setRange(0, std::max(0, static_cast<int>(std::ceil(geometry_.contentHeight())) - vp.height()));
  v->setPageStep(std::max(1, vp.height()));
  v->setSingleStep(std::max(8, static_cast<int>(geometry_.laneHeight() / 2)));
}

void TimeStripView::resizeEvent(QResizeEvent* event) {
  QAbstractScrollArea::resizeEvent(event);
  relayout();
}

void TimeStripView::scrollContentsBy(int dx, int dy) {
  // Everything in the viewport is anchored to content coordinates, so a
  // scroll is a blit plus a paint of the newly exposed band only.
  viewport()->scroll(dx, dy);
  if (dx) header_->update();
  if (dy) labels_->update();
}

QPointF TimeStripView::contentPos(QPointF vp) const {
  return {vp.x() + horizontalScrollBar()->value(), vp.y() + verticalScrollBar()->value()};
}

void TimeStripView::setCursor(int lane, int frame) {
  if (lanes_.empty()) return;
  lane = std::clamp(lane, 0, static_cast<int>(lanes_.size()) - 1);
  frame = axis_.clampFrame(frame);
  const bool changed = lane != cursorLane_ || frame != cursorFrame_;
  cursorLane_ = lane;
  cursorFrame_ = frame;
  if (selected_) {
    // The selection follows the cursor: it stays only while the cursor is on it.
    const ReviewEvent* e = session_ ? session_->event(*selected_) : nullptr;
    const TrapId t = lanes_[static_cast<size_t>(lane)];
    if (!e || e->event.frame != frame || TrapId{e->event.position, e->event.trap} != t)
      selected_.reset();
  }
  ensureCursorVisible();
  viewport()->update();
  header_->update();
  labels_->update();
  if (changed) emit cursorChanged(lanes_[static_cast<size_t>(lane)], frame);
}

void TimeStripView::moveFrames(int delta) { setCursor(cursorLane_, cursorFrame_ + delta); }

void TimeStripView::moveLanes(int delta) { setCursor(cursorLane_ + delta, cursorFrame_); }

bool TimeStripView::jumpToEvent(int direction, bool undecidedOnly) {
  auto t = currentTrap();
  if (!t || !session_) return false;
  const auto& list = session_->events(*t);
  const ReviewEvent* target = nullptr;
  if (direction > 0) {
    for (const auto& e : list)
      if (e.event.frame > cursorFrame_ && (!undecidedOnly || e.decision == Decision::Proposed)) {
        target = &e;
        break;
      }
  } else {
    for (auto it = list.rbegin(); it != list.rend(); ++it)
      if (it->event.frame < cursorFrame_ &&
          (!undecidedOnly || it->decision == Decision::Proposed)) {
        target = &*it;
        break;
      }
  }
  if (!target) return false;
  setCursor(cursorLane_, target->event.frame);
  selectEvent(target->event.id);
  return true;
}

void TimeStripView::goToTrap(TrapId trap, std::optional<int> frame) {
  auto it = std::find(lanes_.begin(), lanes_.end(), trap);
  if (it == lanes_.end()) return;
  setCursor(static_cast<int>(it - lanes_.begin()), frame.value_or(cursorFrame_));
}

void TimeStripView::selectEvent(std::optional<std::int64_t> id) {
  selected_ = id;
  viewport()->update();
}

void TimeStripView::ensureCursorVisible() {
  const QSize vp = viewport()->size();
  auto* h = horizontalScrollBar();
  const double ppf = axis_.pixelsPerFrame();
  // Keep a margin of a few frames (or 10% of the width) around the cursor.
  const double margin = std::min(vp.width() * 0.25, std::max(vp.width() * 0.1, 3 * ppf));
  const double left = axis_.frameLeft(cursorFrame_);
  const double right = left + ppf;
  if (left - margin < h->value())
    h->setValue(static_cast<int>(std::floor(left - margin)));
  else if (right + margin > h->value() + vp.width())
    h->setValue(static_cast<int>(std::ceil(right + margin - vp.width())));
  auto* v = verticalScrollBar();
  const double top = geometry_.laneTop(cursorLane_);
  const double bottom = top + geometry_.laneHeight();
  if (top < v->value())
    v->setValue(static_cast<int>(std::floor(top)));
  else if (bottom > v->value() + vp.height())
    v->setValue(static_cast<int>(std::ceil(bottom - vp.height())));
}

void TimeStripView::setPixelsPerFrame(double ppf, std::optional<int> anchorX) {
  const int vpw = viewport()->width();
  // Without an anchor, zoom about the cursor when it is on screen, else the centre.
  int anchor = anchorX.value_or(vpw / 2);
  if (!anchorX) {
    const double cx = axis_.frameCentre(cursorFrame_) - horizontalScrollBar()->value();
    if (cx >= 0 && cx <= vpw) anchor = static_cast<int>(cx);
  }
  const double frameAtAnchor = (anchor + horizontalScrollBar()->value()) / axis_.pixelsPerFrame();
  const double before = axis_.pixelsPerFrame();
  const double kept = axis_.setPixelsPerFrame(ppf);
  if (kept == before) return;
  relayout();
  horizontalScrollBar()->setValue(static_cast<int>(std::lround(frameAtAnchor * kept - anchor)));
  if (!anchorX) ensureCursorVisible();
  emit zoomChanged(kept);
}

void TimeStripView::zoomBy(double factor) { setPixelsPerFrame(axis_.pixelsPerFrame() * factor); }

void TimeStripView::zoomToFit() {
  if (axis_.frameCount() == 0) return;
  setPixelsPerFrame(static_cast<double>(viewport()->width()) / axis_.frameCount());
}

void TimeStripView::zoomToCrops() {
  setPixelsPerFrame(cropSize_.isEmpty() ? 48.0 : std::max(cropSize_.width(), 24));
}

void TimeStripView::onTrapChanged(TrapId trap) {
  if (std::find(lanes_.begin(), lanes_.end(), trap) == lanes_.end()) return;
  if (selected_ && session_ && !session_->event(*selected_)) selected_.reset();
  viewport()->update();
  labels_->update();
}

void TimeStripView::onThumbnailReady(const ThumbnailKey& key) {
  if (key.trap.position != position_) return;
  auto it = std::find(lanes_.begin(), lanes_.end(), key.trap);
  if (it == lanes_.end()) return;
  const int lane = static_cast<int>(it - lanes_.begin());
  const int frames = key.kind == ThumbnailKind::Crop ? 1 : key.size.width();
  QRectF r(axis_.frameLeft(key.frame), geometry_.laneTop(lane), frames * axis_.pixelsPerFrame(),
           geometry_.stripHeight());
  r.translate(-horizontalScrollBar()->value(), -verticalScrollBar()->value());
  viewport()->update(r.toAlignedRect().adjusted(-1, -1, 1, 1));
}

double TimeStripView::glyphSize() const {
  if (geometry_.mode() == StripMode::Kymograph) return 13.0;
  return std::clamp(axis_.pixelsPerFrame() * 0.5, 15.0, 19.0);
}

const ReviewEvent* TimeStripView::eventNear(int lane, double contentX) const {
  if (!session_ || lane < 0 || lane >= static_cast<int>(lanes_.size())) return nullptr;
  const double grab = std::max(axis_.pixelsPerFrame() / 2, glyphSize() / 2 + 2);
  const ReviewEvent* best = nullptr;
  double bestD = grab;
  for (const auto& e : session_->events(lanes_[static_cast<size_t>(lane)])) {
    const double d = std::abs(axis_.frameCentre(e.event.frame) - contentX);
    // Ties go to the event that still counts, so a rejected ghost never hides a live call.
    if (d < bestD || (best && d == bestD && !best->counts() && e.counts())) {
      best = &e;
      bestD = d;
    }
  }
  return best;
}

// ---- painting -------------------------------------------------------------

void TimeStripView::paintEvent(QPaintEvent* event) {
  QPainter p(viewport());
  paintViewport(p, event->rect());
}

void TimeStripView::paintViewport(QPainter& p, const QRect& rect) {
  const int hs = horizontalScrollBar()->value();
  const int vs = verticalScrollBar()->value();
  p.fillRect(rect, kBackground);
  if (lanes_.empty()) {
    p.setPen(palette().color(QPalette::PlaceholderText));
    p.drawText(viewport()->rect(), Qt::AlignCenter,
               session_ ? tr("This position has no traps.") : tr("No project open."));
    return;
  }
  if (loader_) loader_->beginPass();
  p.save();
  p.translate(-hs, -vs);
  const QRectF content = QRectF(rect).translated(hs, vs);
  const double width = axis_.contentWidth();
  const auto lanes = geometry_.lanesIn(content.top(), content.bottom());
  const auto frames = axis_.framesIn(content.left(), content.right());
  for (int lane = lanes.first; lane <= lanes.second; ++lane) {
    if (lane == cursorLane_) {
      QRectF band(content.left(), geometry_.laneTop(lane), content.width(), geometry_.laneHeight());
      p.fillRect(band, kCurrentLane);
    }
    paintStrip(p, lane, frames, width);
    paintEvents(p, lane, frames, width);
  }
  if (content.right() > width)
    p.fillRect(QRectF(width, content.top(), content.right() - width, content.height()), kAfterEnd);
  paintCursor(p, content);
  p.restore();
}

void TimeStripView::paintStrip(QPainter& p, int lane, std::pair<int, int> frames, double width) {
  const QRectF strip = geometry_.stripRect(lane, width);
  if (!loader_ || cropSize_.isEmpty()) {
    p.fillRect(strip, kPlaceholder);
    // Repeated along the strip at fixed content positions, so it survives scroll blits.
    p.setPen(QColor(0x55, 0x55, 0x55));
    for (double x = 8; x < width; x += 900)
      p.drawText(QRectF(x, strip.top(), 600, strip.height()), Qt::AlignLeft | Qt::AlignVCenter,
                 tr("Images not available for this project: events only."));
    return;
  }
  if (frames.first > frames.second) return;
  if (geometry_.mode() == StripMode::Crops)
    paintCrops(p, lane, frames);
  else
    paintKymograph(p, lane, frames);
}

void TimeStripView::paintCrops(QPainter& p, int lane, std::pair<int, int> frames) {
  const TrapId trap = lanes_[static_cast<size_t>(lane)];
  const double dpr = devicePixelRatioF();
  const double ppf = axis_.pixelsPerFrame();
  const double scale =
      std::min(ppf / cropSize_.width(), geometry_.stripHeight() / cropSize_.height());
  const QSizeF drawn(cropSize_.width() * scale, cropSize_.height() * scale);
  // Quantised request heights keep zooming from filling the cache with near-duplicates.
  const int reqH = roundUpTo(drawn.height() * dpr, 8);
  const QSize req(std::max(1, static_cast<int>(std::lround(reqH * cropSize_.width() /
                                                           double(cropSize_.height())))),
                  reqH);
  const bool separators = ppf >= 24;
  for (int f = frames.first; f <= frames.second; ++f) {
    const QRectF slot = geometry_.slotRect(axis_, lane, f);
    const QRectF target(slot.center().x() - drawn.width() / 2,
                        slot.center().y() - drawn.height() / 2, drawn.width(), drawn.height());
    const QImage img = loader_->fetch({trap, f, req, ThumbnailKind::Crop});
    if (img.isNull())
      p.fillRect(target, kPlaceholder);
    else
      p.drawImage(target, img);
    if (separators) p.fillRect(QRectF(slot.left(), slot.top(), 1, slot.height()), kBackground);
  }
}

void TimeStripView::paintKymograph(QPainter& p, int lane, std::pair<int, int> frames) {
  const TrapId trap = lanes_[static_cast<size_t>(lane)];
  constexpr int T = ThumbnailLoader::kKymographTileFrames;
  const int h =
      std::max(8, static_cast<int>(std::lround(geometry_.stripHeight() * devicePixelRatioF())));
  const double top = geometry_.laneTop(lane);
  p.save();
  p.setRenderHint(QPainter::SmoothPixmapTransform, false);
  for (int t = frames.first / T; t <= frames.second / T; ++t) {
    const int start = t * T;
    const int n = std::min(T, axis_.frameCount() - start);
    const QRectF r(axis_.frameLeft(start), top, n * axis_.pixelsPerFrame(),
                   geometry_.stripHeight());
    const QImage img = loader_->fetch({trap, start, QSize(n, h), ThumbnailKind::KymographTile});
    if (img.isNull())
      p.fillRect(r, kPlaceholder);
    else
      p.drawImage(r, img);
  }
  p.restore();
}

void TimeStripView::paintEvents(QPainter& p, int lane, std::pair<int, int> frames, double width) {
  const QRectF lr = geometry_.eventRect(lane, width);
  p.fillRect(lr, lane == cursorLane_ ? kCurrentLane.lighter(104) : kEventLane);
  p.fillRect(QRectF(lr.left(), lr.top(), lr.width(), 1), QColor(0xBB, 0xBB, 0xBB));
  if (!session_ || frames.first > frames.second) return;
  const double size = glyphSize();
  const double cy = lr.center().y() + 1;
  const double ppf = axis_.pixelsPerFrame();
  // Glyphs overhang their frame: include neighbours whose glyph reaches into view.
  const int reach = static_cast<int>(std::ceil(size / ppf)) + 1;
  const int f0 = frames.first - reach, f1 = frames.second + reach;
  const auto& list = session_->events(lanes_[static_cast<size_t>(lane)]);
  // Moved traces first, so the glyphs sit on top of the connectors.
  for (const auto& e : list)
    if (e.decision == Decision::Moved && e.proposedFrame) {
      const int a = std::min(*e.proposedFrame, e.event.frame);
      const int b = std::max(*e.proposedFrame, e.event.frame);
      if (b < f0 || a > f1) continue;
      glyphs::paintMoveTrace(p, {axis_.frameCentre(*e.proposedFrame), cy},
                             {axis_.frameCentre(e.event.frame), cy}, size, e.event.kind);
    }
  QFont small = font();
  small.setPointSizeF(std::max(7.0, font().pointSizeF() * 0.8));
  // When zoomed out, neighbouring calls (a bud just after a separation) would
  // sit on each other: alternate colliding glyphs between an upper and a lower row.
  const double rowShift = geometry_.mode() == StripMode::Kymograph ? size * 0.36 : 0.0;
  std::vector<double> rowY(list.size(), cy);
  if (rowShift > 0) {
    double lastX = -1e9;
    bool upper = true;
    for (size_t i = 0; i < list.size(); ++i) {
      if (!list[i].counts()) continue;
      const double x = axis_.frameCentre(list[i].event.frame);
      upper = x - lastX < size * 0.95 ? !upper : true;
      rowY[i] = upper ? cy - rowShift : cy + rowShift;
      lastX = x;
    }
  }
  // Rejected first, live calls on top.
  for (int pass = 0; pass < 2; ++pass)
    for (size_t i = 0; i < list.size(); ++i) {
      const ReviewEvent& e = list[i];
      if (e.event.frame < f0 || e.event.frame > f1) continue;
      if ((pass == 0) == e.counts()) continue;
      const bool dragging = drag_ && drag_->eventId == e.event.id;
      const double x = axis_.frameCentre(dragging ? drag_->toFrame : e.event.frame);
      atlas_.draw(p, {x, rowY[i]}, size, e, selected_ && *selected_ == e.event.id,
                  devicePixelRatioF());
      if (e.decision == Decision::Proposed && ppf >= 44) {
        p.setFont(small);
        p.setPen(QColor(0x33, 0x33, 0x33));
        p.drawText(QRectF(x + size * 0.62, lr.top(), ppf - size * 0.62 - 2, lr.height()),
                   Qt::AlignLeft | Qt::AlignVCenter,
                   QStringLiteral("%1%").arg(std::lround(e.event.confidence * 100)));
      }
    }
}

void TimeStripView::paintCursor(QPainter& p, const QRectF& content) {
  const double x = axis_.frameCentre(cursorFrame_);
  const double ppf = axis_.pixelsPerFrame();
  if (x < content.left() - ppf - 20 || x > content.right() + ppf + 20) return;
  const QColor c = glyphs::cursorColour();
  const QColor halo(255, 255, 255, 170);
  const auto lanes = geometry_.lanesIn(content.top(), content.bottom());
  if (geometry_.mode() == StripMode::Crops) {
    // Over crops a centre line would hide the cells: bracket the current
    // frame's crop in every lane instead, and draw the line only between strips.
    const double l = axis_.frameLeft(cursorFrame_), r = l + ppf;
    for (int lane = lanes.first; lane <= lanes.second; ++lane) {
      const QRectF s = geometry_.stripRect(lane, 0);
      p.fillRect(QRectF(l - 2, s.top(), 3, s.height()), halo);
      p.fillRect(QRectF(r - 1, s.top(), 3, s.height()), halo);
      p.fillRect(QRectF(l - 1, s.top(), 2, s.height()), c);
      p.fillRect(QRectF(r - 1, s.top(), 2, s.height()), c);
      const double gapTop = s.bottom();
      const double gapBottom = geometry_.laneTop(lane) + geometry_.laneHeight();
      p.fillRect(QRectF(x - 2, gapTop, 4, gapBottom - gapTop), halo);
      p.fillRect(QRectF(x - 1, gapTop, 2, gapBottom - gapTop), c);
    }
  } else {
    // A dark line with light edges reads on both bright and dark kymographs.
    p.fillRect(QRectF(x - 2, content.top(), 4, content.height()), halo);
    p.fillRect(QRectF(x - 1, content.top(), 2, content.height()), c);
  }
  // The current lane's slot gets a heavy box so the current crop stands out.
  const double w = std::max(ppf, 10.0);
  const double top = geometry_.laneTop(cursorLane_);
  const QRectF box(x - w / 2 - 1.5, top + 1.5, w + 3,
                   geometry_.stripHeight() + geometry_.eventLaneHeight() - 3);
  p.save();
  p.setRenderHint(QPainter::Antialiasing);
  p.setBrush(Qt::NoBrush);
  p.setPen(QPen(QColor(0xF0, 0xE4, 0x42), 5));
  p.drawRect(box);
  p.setPen(QPen(c, 2.5));
  p.drawRect(box);
  p.restore();
}

// ---- interaction ----------------------------------------------------------

QString TimeStripView::tooltipAt(QPoint vp) const {
  if (lanes_.empty()) return {};
  const QPointF c = contentPos(vp);
  const auto hit = geometry_.hitAt(c.y());
  if (hit.lane < 0 || c.x() >= axis_.contentWidth()) return {};
  const TrapId trap = lanes_[static_cast<size_t>(hit.lane)];
  const int frame = axis_.frameAt(c.x());
  const QString clock = axis_.clockLabel(frame);
  const QString where =
      clock.isEmpty() ? tr("frame %1").arg(frame) : tr("frame %1 (%2)").arg(frame).arg(clock);
  if (hit.part == StripGeometry::Part::Events) {
    if (const ReviewEvent* e = eventNear(hit.lane, c.x())) {
      QString text = tr("<b>%1</b> — %2<br>trap %3, frame %4")
                         .arg(kindName(e->event.kind), decisionName(e->decision))
                         .arg(trap.trap)
                         .arg(e->event.frame);
      if (e->decision == Decision::Proposed || e->decision == Decision::Accepted ||
          e->decision == Decision::Moved || e->decision == Decision::Rejected)
        text += tr("<br>engine confidence %1%").arg(std::lround(e->event.confidence * 100));
      if (e->proposedFrame) text += tr("<br>engine put it at frame %1").arg(*e->proposedFrame);
      return text;
    }
  }
  return tr("trap %1, %2").arg(trap.trap).arg(where);
}

bool TimeStripView::viewportEvent(QEvent* event) {
  if (event->type() == QEvent::ToolTip) {
    auto* he = static_cast<QHelpEvent*>(event);
    const QString text = tooltipAt(he->pos());
    if (text.isEmpty())
      QToolTip::hideText();
    else
      QToolTip::showText(he->globalPos(), text, viewport());
    return true;
  }
  return QAbstractScrollArea::viewportEvent(event);
}

void TimeStripView::mousePressEvent(QMouseEvent* event) {
  if (event->button() != Qt::LeftButton || lanes_.empty()) {
    QAbstractScrollArea::mousePressEvent(event);
    return;
  }
  const QPointF c = contentPos(event->position());
  const auto hit = geometry_.hitAt(c.y());
  if (hit.lane < 0 || c.x() >= axis_.contentWidth()) return;
  const ReviewEvent* e =
      hit.part == StripGeometry::Part::Events ? eventNear(hit.lane, c.x()) : nullptr;
  if (e) {
    setCursor(hit.lane, e->event.frame);
    selectEvent(e->event.id);
    if (editable_ && e->counts())
      drag_ = Drag{e->event.id, hit.lane, e->event.frame, e->event.frame};
  } else {
    setCursor(hit.lane, axis_.frameAt(c.x()));
    const ReviewEvent* at = eventAtCursor();
    selectEvent(at ? std::optional(at->event.id) : std::nullopt);
  }
}

void TimeStripView::mouseMoveEvent(QMouseEvent* event) {
  if (!drag_) return;
  const int frame = axis_.frameAt(contentPos(event->position()).x());
  if (frame != drag_->toFrame) {
    drag_->toFrame = frame;
    viewport()->update();
  }
}

void TimeStripView::mouseReleaseEvent(QMouseEvent* event) {
  if (!drag_ || event->button() != Qt::LeftButton) return;
  const Drag d = *drag_;
  drag_.reset();
  viewport()->update();
  if (d.toFrame != d.fromFrame) {
    setCursor(d.lane, d.toFrame);
    emit moveRequested(d.eventId, d.toFrame);
  }
}

void TimeStripView::wheelEvent(QWheelEvent* event) {
  if (event->modifiers() & Qt::ControlModifier) {
    const double steps = event->angleDelta().y() / 120.0;
    if (steps != 0) {
      setPixelsPerFrame(axis_.pixelsPerFrame() * std::pow(1.2, steps),
                        static_cast<int>(event->position().x()));
    }
    event->accept();
    return;
  }
  if (event->modifiers() & Qt::ShiftModifier) {
    auto* h = horizontalScrollBar();
    h->setValue(h->value() - event->angleDelta().y());
    event->accept();
    return;
  }
  QAbstractScrollArea::wheelEvent(event);
}

}  // namespace budledger::ui
