#include "ui/time_axis_header.h"

#include <QMouseEvent>
#include <QPainter>
#include <QScrollBar>
#include <algorithm>

#include "ui/event_glyphs.h"
#include "ui/time_strip_view.h"

namespace budledger::ui {

TimeAxisHeader::TimeAxisHeader(TimeStripView* view) : QWidget(view), view_(view) {
  setObjectName(QStringLiteral("timeAxis"));
  setAttribute(Qt::WA_OpaquePaintEvent);
}

void TimeAxisHeader::paintEvent(QPaintEvent* event) {
  QPainter p(this);
  const QRect r = event->rect();
  const QColor bg(0xF7, 0xF7, 0xF7);
  p.fillRect(r, bg);
  const int left = TimeStripView::kLabelWidth;
  const TimeAxis& axis = view_->axis();
  const bool clock = axis.intervalMinutes().has_value();
  const QFontMetrics fm(font());
  QFont small = font();
  small.setPointSizeF(font().pointSizeF() * 0.85);
  const QFontMetrics sfm(small);
  const int rowClock = 4, rowFrame = rowClock + fm.height();
  const int tickTop = height() - 8;

  // Row titles in the corner above the lane labels.
  p.setPen(QColor(0x55, 0x55, 0x55));
  if (clock) {
    p.drawText(QRect(0, rowClock, left - 10, fm.height()), Qt::AlignRight | Qt::AlignVCenter,
               tr("time h:mm"));
  }
  p.setFont(small);
  p.drawText(QRect(0, clock ? rowFrame : rowClock, left - 10, sfm.height()),
             Qt::AlignRight | Qt::AlignVCenter, tr("frame"));
  p.setFont(font());
  p.fillRect(QRect(left - 1, 0, 1, height()), QColor(0xBB, 0xBB, 0xBB));

  p.setClipRect(QRect(left, 0, width() - left, height()));
  const int hs = view_->horizontalScrollBar()->value();
  const double x0 = hs, x1 = hs + width() - left;
  const QString widest = clock ? QStringLiteral("00:00") : QStringLiteral("0000");
  const double gap =
      std::max(fm.horizontalAdvance(widest), sfm.horizontalAdvance(QStringLiteral("0000"))) + 18.0;
  const double ppf = axis.pixelsPerFrame();

  // The current frame's flag is placed first so tick labels can make room for it.
  const int cf = view_->cursorFrame();
  const double cx = left + axis.frameCentre(cf) - hs;
  const bool flagShown = cx >= left - 2 && cx <= width() + 2 && axis.frameCount() > 0;
  QFont bold = font();
  bold.setBold(true);
  const QFontMetrics bfm(bold);
  const QString clockText = axis.clockLabel(cf);
  const QString label =
      clockText.isEmpty() ? tr("frame %1").arg(cf) : tr("%1 · frame %2").arg(clockText).arg(cf);
  const int fw = bfm.horizontalAdvance(label) + 14;
  const double fx = std::clamp(cx - fw / 2.0, double(left), double(std::max(left, width() - fw)));
  const QRectF flag(fx, 3, fw, bfm.height() + 6);

  for (const auto& t : axis.ticks(x0, x1, gap)) {
    const double x = left + t.x - hs + ppf / 2;
    if (!t.major) {
      p.fillRect(QRectF(x, tickTop + 4, 1, 4), QColor(0x99, 0x99, 0x99));
      continue;
    }
    p.fillRect(QRectF(x, tickTop, 1, 8), QColor(0x44, 0x44, 0x44));
    const QRectF box(x - gap / 2, rowClock, gap, rowFrame + sfm.height() - rowClock);
    // A label cut by an edge or hidden under the flag is noise: leave it out.
    if (box.left() < left || box.right() > width()) continue;
    if (flagShown && box.adjusted(4, 0, -4, 0).intersects(flag)) continue;
    if (clock) {
      p.setFont(font());
      p.setPen(QColor(0x22, 0x22, 0x22));
      p.drawText(QRectF(box.left(), rowClock, gap, fm.height()), Qt::AlignCenter,
                 axis.clockLabel(t.frame));
    }
    p.setFont(small);
    p.setPen(QColor(0x66, 0x66, 0x66));
    p.drawText(QRectF(box.left(), clock ? rowFrame : rowClock, gap, sfm.height()), Qt::AlignCenter,
               QString::number(t.frame));
  }
  p.fillRect(QRect(left, height() - 1, width() - left, 1), QColor(0xBB, 0xBB, 0xBB));

  if (flagShown) {
    p.setFont(bold);
    p.setRenderHint(QPainter::Antialiasing);
    p.setPen(Qt::NoPen);
    p.setBrush(glyphs::cursorColour());
    p.drawRoundedRect(flag, 4, 4);
    p.drawPolygon(QPolygonF(
        {QPointF(cx - 5, flag.bottom()), QPointF(cx + 5, flag.bottom()), QPointF(cx, height())}));
    p.setPen(Qt::white);
    p.drawText(flag, Qt::AlignCenter, label);
  }
}

void TimeAxisHeader::mousePressEvent(QMouseEvent* event) {
  const int left = TimeStripView::kLabelWidth;
  if (event->position().x() < left) return;
  const double x = event->position().x() - left + view_->horizontalScrollBar()->value();
  view_->setCursor(view_->cursorLane(), view_->axis().frameAt(x));
}

}  // namespace budledger::ui
