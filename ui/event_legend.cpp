#include "ui/event_legend.h"

#include <QPainter>

#include "ui/event_glyphs.h"

namespace budledger::ui {

namespace {
constexpr double kGlyph = 16;
constexpr int kGap = 16;
constexpr int kMargin = 4;
}  // namespace

EventLegend::EventLegend(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("eventLegend"));
  QSizePolicy policy(QSizePolicy::Preferred, QSizePolicy::Preferred);
  policy.setHeightForWidth(true);
  setSizePolicy(policy);
}

std::vector<EventLegend::Item> EventLegend::items() const {
  const QFontMetrics fm(font());
  std::vector<Item> out;
  for (EventKind k : kAllEventKinds) {
    const QString text = kindName(k);
    out.push_back(
        {static_cast<int>(k), -1, text, static_cast<int>(kGlyph) + 6 + fm.horizontalAdvance(text)});
  }
  for (Decision d : kAllDecisions) {
    const QString text =
        d == Decision::Proposed ? tr("proposed (fill = confidence)") : decisionName(d);
    out.push_back({-1, static_cast<int>(d), text,
                   static_cast<int>(kGlyph) + 10 + fm.horizontalAdvance(text)});
  }
  return out;
}

int EventLegend::rowHeight() const {
  return std::max(QFontMetrics(font()).height(), static_cast<int>(kGlyph)) + 8;
}

int EventLegend::layout(int width, std::vector<QPoint>* at) const {
  int x = kMargin, row = 0;
  for (const Item& i : items()) {
    // Decisions start a new group: keep a visible break before the first one.
    const int lead = (i.decision == 0 && x > kMargin) ? kGap : 0;
    if (x + lead + i.width > width - kMargin && x > kMargin) {
      ++row;
      x = kMargin;
    } else {
      x += lead;
    }
    if (at) at->push_back({x, row * rowHeight()});
    x += i.width + kGap;
  }
  return row + 1;
}

int EventLegend::heightForWidth(int width) const { return layout(width, nullptr) * rowHeight(); }

QSize EventLegend::sizeHint() const {
  int w = kMargin;
  for (const Item& i : items()) w += i.width + kGap;
  return {w + kGap, rowHeight()};
}

QSize EventLegend::minimumSizeHint() const { return {220, rowHeight()}; }

void EventLegend::paintEvent(QPaintEvent*) {
  QPainter p(this);
  std::vector<QPoint> at;
  layout(width(), &at);
  const auto list = items();
  const int rh = rowHeight();
  for (size_t n = 0; n < list.size(); ++n) {
    const Item& i = list[n];
    const QPointF c(at[n].x() + kGlyph / 2, at[n].y() + rh / 2.0);
    if (i.kind >= 0) {
      // Kinds are keyed by a plain filled shape, without a decision badge.
      const auto kind = static_cast<EventKind>(i.kind);
      p.save();
      p.setRenderHint(QPainter::Antialiasing);
      p.setPen(QPen(QColor(0x10, 0x10, 0x10), 1.4));
      p.setBrush(glyphs::kindColour(kind));
      p.drawPath(glyphs::shape(kind, c, kGlyph));
      p.restore();
    } else {
      ReviewEvent e;
      e.event.kind = EventKind::Separation;
      e.event.confidence = 0.6;
      e.decision = static_cast<Decision>(i.decision);
      glyphs::paint(p, c + QPointF(0, 1), kGlyph, e);
    }
    const int tx = at[n].x() + static_cast<int>(kGlyph) + (i.kind >= 0 ? 6 : 10);
    p.setPen(palette().color(QPalette::WindowText));
    p.drawText(QRect(tx, at[n].y(), i.width, rh), Qt::AlignVCenter | Qt::AlignLeft, i.text);
  }
}

}  // namespace budledger::ui
