#include "ui/lane_label_column.h"

#include <QMouseEvent>
#include <QPainter>
#include <QScrollBar>
#include <QWheelEvent>
#include <numeric>

#include "ui/counted.h"
#include "ui/event_glyphs.h"
#include "ui/review_state_mark.h"
#include "ui/time_strip_view.h"

namespace budledger::ui {

LaneLabelColumn::LaneLabelColumn(TimeStripView* view) : QWidget(view), view_(view) {
  setObjectName(QStringLiteral("laneLabels"));
  setAttribute(Qt::WA_OpaquePaintEvent);
}

void LaneLabelColumn::paintEvent(QPaintEvent* event) {
  QPainter p(this);
  p.fillRect(event->rect(), QColor(0xF7, 0xF7, 0xF7));
  const int vs = view_->verticalScrollBar()->value();
  const StripGeometry& g = view_->geometry();
  const auto lanes = g.lanesIn(event->rect().top() + vs, event->rect().bottom() + 1 + vs);
  ReviewSession* session = view_->session();
  QFont bold = font();
  bold.setBold(true);
  const QFontMetrics fm(font());
  for (int lane = lanes.first; lane <= lanes.second; ++lane) {
    const TrapId trap = view_->lanes()[static_cast<size_t>(lane)];
    const QRectF band(0, g.laneTop(lane) - vs, width(), g.laneHeight() - StripGeometry::kLaneGap);
    const bool current = lane == view_->cursorLane();
    if (current) {
      p.fillRect(band, QColor(0xFF, 0xF6, 0xCC));
      p.fillRect(QRectF(0, band.top(), 5, band.height()), glyphs::cursorColour());
    }
    const double x = 12;
    double y = band.top() + 4;
    // Name and review mark.
    const ReviewState state = session ? session->reviewState(trap) : ReviewState::NotStarted;
    paintReviewStateMark(p, QRectF(x, y, 16, 16), state);
    p.setFont(bold);
    p.setPen(QColor(0x11, 0x11, 0x11));
    p.drawText(QRectF(x + 22, y, width() - x - 26, fm.height()), Qt::AlignLeft | Qt::AlignVCenter,
               tr("trap %1").arg(trap.trap));
    y += fm.height() + 2;
    p.setFont(font());
    p.setPen(QColor(0x44, 0x44, 0x44));
    if (y + fm.height() <= band.bottom()) {
      p.drawText(QRectF(x, y, width() - x - 6, fm.height()), Qt::AlignLeft | Qt::AlignVCenter,
                 reviewStateName(state));
      y += fm.height();
    }
    if (session && y + fm.height() <= band.bottom()) {
      const auto& tenures = session->tenures(trap);
      const int divisions = std::accumulate(tenures.begin(), tenures.end(), 0,
                                            [](int a, const auto& t) { return a + t.divisions; });
      // One fact a line: the column is narrow, and a cut-off count misleads.
      p.drawText(QRectF(x, y, width() - x - 6, fm.height()), Qt::AlignLeft | Qt::AlignVCenter,
                 counted(divisions, tr("%1 division"), tr("%1 divisions")));
      y += fm.height();
      if (tenures.size() > 1 && y + fm.height() <= band.bottom())
        p.drawText(QRectF(x, y, width() - x - 6, fm.height()), Qt::AlignLeft | Qt::AlignVCenter,
                   tr("%1 mothers").arg(tenures.size()));
    }
    p.fillRect(QRectF(0, band.bottom() + StripGeometry::kLaneGap / 2, width(), 1),
               QColor(0xDD, 0xDD, 0xDD));
  }
  p.fillRect(QRect(width() - 1, event->rect().top(), 1, event->rect().height()),
             QColor(0xBB, 0xBB, 0xBB));
}

void LaneLabelColumn::mousePressEvent(QMouseEvent* event) {
  const auto hit =
      view_->geometry().hitAt(event->position().y() + view_->verticalScrollBar()->value());
  if (hit.lane >= 0) view_->setCursor(hit.lane, view_->cursorFrame());
  view_->setFocus();
}

void LaneLabelColumn::wheelEvent(QWheelEvent* event) {
  auto* v = view_->verticalScrollBar();
  v->setValue(v->value() - event->angleDelta().y());
  event->accept();
}

}  // namespace budledger::ui
