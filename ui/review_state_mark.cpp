#include "ui/review_state_mark.h"

#include <QIconEngine>
#include <QPainter>
#include <QPainterPath>
#include <algorithm>

namespace budledger::ui {

void paintReviewStateMark(QPainter& p, const QRectF& boxIn, ReviewState state) {
  p.save();
  p.setRenderHint(QPainter::Antialiasing);
  const double s = std::min(boxIn.width(), boxIn.height());
  const QRectF box(boxIn.center().x() - s / 2, boxIn.center().y() - s / 2, s, s);
  const QRectF ring = box.adjusted(1.5, 1.5, -1.5, -1.5);
  const QColor ink(0x22, 0x22, 0x22);
  const QColor done(0x00, 0x72, 0xB2);  // Okabe–Ito blue
  switch (state) {
    case ReviewState::NotStarted:
      p.setPen(QPen(QColor(0x77, 0x77, 0x77), 1.5));
      p.setBrush(Qt::white);
      p.drawEllipse(ring);
      break;
    case ReviewState::InProgress: {
      p.setPen(QPen(ink, 1.5));
      p.setBrush(Qt::white);
      p.drawEllipse(ring);
      QPainterPath half;
      half.moveTo(ring.center());
      half.arcTo(ring, 90, 180);
      half.closeSubpath();
      p.setPen(Qt::NoPen);
      p.setBrush(done);
      p.drawPath(half);
      p.setPen(QPen(ink, 1.5));
      p.setBrush(Qt::NoBrush);
      p.drawEllipse(ring);
      break;
    }
    case ReviewState::Reviewed: {
      p.setPen(QPen(ink, 1.2));
      p.setBrush(done);
      p.drawEllipse(ring);
      p.setPen(
          QPen(Qt::white, std::max(1.5, s * 0.13), Qt::SolidLine, Qt::RoundCap, Qt::RoundJoin));
      const QPointF c = ring.center();
      const double q = ring.width() * 0.24;
      p.drawPolyline(
          QPolygonF({QPointF(c.x() - q, c.y()), QPointF(c.x() - q * 0.25, c.y() + q * 0.8),
                     QPointF(c.x() + q * 1.1, c.y() - q * 0.8)}));
      break;
    }
    case ReviewState::SignedOff: {
      // Padlock: shackle arc over a body.
      const QRectF body(box.left() + s * 0.18, box.top() + s * 0.45, s * 0.64, s * 0.48);
      const QRectF shackle(box.left() + s * 0.3, box.top() + s * 0.1, s * 0.4, s * 0.6);
      p.setPen(QPen(ink, std::max(1.5, s * 0.11)));
      p.setBrush(Qt::NoBrush);
      p.drawArc(shackle, 0, 180 * 16);
      p.drawLine(QPointF(shackle.left(), shackle.center().y()),
                 QPointF(shackle.left(), body.top()));
      p.drawLine(QPointF(shackle.right(), shackle.center().y()),
                 QPointF(shackle.right(), body.top()));
      p.setPen(QPen(ink, 1.2));
      p.setBrush(QColor(0x00, 0x9E, 0x73));  // Okabe–Ito bluish green
      p.drawRoundedRect(body, 1.5, 1.5);
      break;
    }
  }
  p.restore();
}

namespace {

class MarkEngine : public QIconEngine {
 public:
  explicit MarkEngine(ReviewState s) : state_(s) {}
  void paint(QPainter* p, const QRect& rect, QIcon::Mode, QIcon::State) override {
    paintReviewStateMark(*p, QRectF(rect), state_);
  }
  QIconEngine* clone() const override { return new MarkEngine(state_); }

 private:
  ReviewState state_;
};

}  // namespace

QIcon reviewStateIcon(ReviewState state) { return QIcon(new MarkEngine(state)); }

}  // namespace budledger::ui
