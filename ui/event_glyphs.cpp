#include "ui/event_glyphs.h"

#include <QCoreApplication>
#include <QPainter>
#include <algorithm>
#include <cmath>

namespace budledger::ui {

QString kindName(EventKind kind) {
  switch (kind) {
    case EventKind::Bud:
      return QCoreApplication::translate("budledger", "bud");
    case EventKind::Separation:
      return QCoreApplication::translate("budledger", "separation");
    case EventKind::Death:
      return QCoreApplication::translate("budledger", "death");
    case EventKind::Washout:
      return QCoreApplication::translate("budledger", "washout");
    case EventKind::Arrival:
      return QCoreApplication::translate("budledger", "arrival");
  }
  return {};
}

QString decisionName(Decision d) {
  switch (d) {
    case Decision::Proposed:
      return QCoreApplication::translate("budledger", "proposed");
    case Decision::Accepted:
      return QCoreApplication::translate("budledger", "accepted");
    case Decision::Moved:
      return QCoreApplication::translate("budledger", "moved");
    case Decision::Added:
      return QCoreApplication::translate("budledger", "added");
    case Decision::Rejected:
      return QCoreApplication::translate("budledger", "rejected");
  }
  return {};
}

namespace glyphs {

QColor kindColour(EventKind kind) {
  switch (kind) {
    case EventKind::Bud:
      return QColor(0x00, 0x9E, 0x73);  // bluish green
    case EventKind::Separation:
      return QColor(0x00, 0x72, 0xB2);  // blue
    case EventKind::Death:
      return QColor(0xD5, 0x5E, 0x00);  // vermillion
    case EventKind::Washout:
      return QColor(0xE6, 0x9F, 0x00);  // orange
    case EventKind::Arrival:
      return QColor(0xCC, 0x79, 0xA7);  // reddish purple
  }
  return Qt::black;
}

QColor cursorColour() { return QColor(0x1A, 0x1A, 0x1A); }

QPainterPath shape(EventKind kind, QPointF c, double size) {
  const double r = size / 2.0;
  QPainterPath path;
  switch (kind) {
    case EventKind::Bud: {  // upward triangle, optically centred
      const double h = size * 0.92;
      path.moveTo(c.x(), c.y() - h * 0.55);
      path.lineTo(c.x() + r, c.y() + h * 0.45);
      path.lineTo(c.x() - r, c.y() + h * 0.45);
      path.closeSubpath();
      break;
    }
    case EventKind::Separation:  // diamond
      path.moveTo(c.x(), c.y() - r);
      path.lineTo(c.x() + r, c.y());
      path.lineTo(c.x(), c.y() + r);
      path.lineTo(c.x() - r, c.y());
      path.closeSubpath();
      break;
    case EventKind::Death: {  // square, slightly smaller to match the others' area
      const double s = r * 0.82;
      path.addRect(QRectF(c.x() - s, c.y() - s, 2 * s, 2 * s));
      break;
    }
    case EventKind::Washout:  // arrow pointing right: the mother leaves
      path.moveTo(c.x() - r, c.y() - r * 0.7);
      path.lineTo(c.x() + r * 0.2, c.y() - r * 0.7);
      path.lineTo(c.x() + r, c.y());
      path.lineTo(c.x() + r * 0.2, c.y() + r * 0.7);
      path.lineTo(c.x() - r, c.y() + r * 0.7);
      path.closeSubpath();
      break;
    case EventKind::Arrival:  // circle
      path.addEllipse(c, r * 0.9, r * 0.9);
      break;
  }
  return path;
}

namespace {

void paintBadge(QPainter& p, QPointF glyphCentre, double size, Decision d) {
  const double b = std::max(5.0, size * 0.42);
  const QPointF c(glyphCentre.x() + size * 0.5, glyphCentre.y() - size * 0.42);
  p.setBrush(Qt::white);
  p.setPen(QPen(QColor(0x20, 0x20, 0x20), 1.0));
  p.drawEllipse(c, b / 2, b / 2);
  QPen mark(QColor(0x10, 0x10, 0x10), std::max(1.2, b * 0.16), Qt::SolidLine, Qt::RoundCap,
            Qt::RoundJoin);
  p.setPen(mark);
  p.setBrush(Qt::NoBrush);
  const double q = b * 0.26;
  switch (d) {
    case Decision::Accepted:
      p.drawPolyline(QPolygonF({QPointF(c.x() - q, c.y()), QPointF(c.x() - q * 0.2, c.y() + q),
                                QPointF(c.x() + q * 1.1, c.y() - q)}));
      break;
    case Decision::Added:
      p.drawLine(QPointF(c.x() - q, c.y()), QPointF(c.x() + q, c.y()));
      p.drawLine(QPointF(c.x(), c.y() - q), QPointF(c.x(), c.y() + q));
      break;
    case Decision::Moved:
      p.drawLine(QPointF(c.x() - q * 1.1, c.y()), QPointF(c.x() + q * 1.1, c.y()));
      p.drawPolyline(
          QPolygonF({QPointF(c.x() - q * 0.5, c.y() - q * 0.6), QPointF(c.x() - q * 1.1, c.y()),
                     QPointF(c.x() - q * 0.5, c.y() + q * 0.6)}));
      p.drawPolyline(
          QPolygonF({QPointF(c.x() + q * 0.5, c.y() - q * 0.6), QPointF(c.x() + q * 1.1, c.y()),
                     QPointF(c.x() + q * 0.5, c.y() + q * 0.6)}));
      break;
    default:
      break;
  }
}

}  // namespace

void paint(QPainter& p, QPointF centre, double size, const ReviewEvent& e, GlyphOptions options) {
  p.save();
  p.setRenderHint(QPainter::Antialiasing, true);
  const QPainterPath path = shape(e.event.kind, centre, size);
  const QColor colour = kindColour(e.event.kind);
  if (options.selected) {
    // A dark ring on white: visible on any lane background without hiding the glyph.
    p.setPen(QPen(cursorColour(), 2.0));
    p.setBrush(Qt::white);
    p.drawEllipse(centre, size * 0.78, size * 0.78);
  }
  switch (e.decision) {
    case Decision::Proposed: {
      // Fill level = confidence: a gauge read at a glance, no legend needed.
      // A gradient with a hard stop fills to the level in one pass (a clip
      // path per glyph costs more than the rest of the strip).
      const double level = std::clamp(e.event.confidence, 0.0, 1.0);
      const QRectF box = path.boundingRect();
      QLinearGradient gauge(box.bottomLeft(), box.topLeft());
      gauge.setColorAt(0, colour);
      gauge.setColorAt(level, colour);
      gauge.setColorAt(std::min(1.0, level + 1e-3), Qt::white);
      gauge.setColorAt(1, Qt::white);
      p.setPen(QPen(colour.darker(130), 1.6));
      p.setBrush(gauge);
      p.drawPath(path);
      break;
    }
    case Decision::Accepted:
    case Decision::Moved:
    case Decision::Added:
      p.setPen(QPen(QColor(0x10, 0x10, 0x10), 1.6));
      p.setBrush(colour);
      p.drawPath(path);
      paintBadge(p, centre, size, e.decision);
      break;
    case Decision::Rejected: {
      p.setOpacity(0.75);
      p.setPen(QPen(QColor(0x70, 0x70, 0x70), 1.4, Qt::DashLine));
      p.setBrush(Qt::NoBrush);
      p.drawPath(path);
      const double r = size / 2;
      p.setPen(QPen(QColor(0x40, 0x40, 0x40), 2.0, Qt::SolidLine, Qt::RoundCap));
      p.drawLine(QPointF(centre.x() - r, centre.y() + r), QPointF(centre.x() + r, centre.y() - r));
      break;
    }
  }
  p.restore();
}

void paintMoveTrace(QPainter& p, QPointF from, QPointF to, double size, EventKind kind) {
  p.save();
  p.setRenderHint(QPainter::Antialiasing, true);
  QColor c = kindColour(kind);
  p.setPen(QPen(c.darker(120), 1.2, Qt::DotLine));
  p.drawLine(from, to);
  p.setPen(QPen(c, 1.2, Qt::DotLine));
  p.setBrush(Qt::NoBrush);
  p.drawPath(shape(kind, from, size * 0.7));
  p.restore();
}

}  // namespace glyphs
}  // namespace budledger::ui
