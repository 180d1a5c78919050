#pragma once
// GlyphAtlas: event glyphs pre-rendered once per look (kind, decision,
// confidence in 5% steps, selection, size, device-pixel ratio) and then
// blitted. An antialiased path with a gradient costs tens of microseconds;
// a zoomed-out screen shows hundreds of calls, so the strips paint sprites.
// The sprites are made with glyphs::paint, so they look exactly like it.
#include <QHash>
#include <QPixmap>
#include <QPointF>

#include "ui/review_event.h"

class QPainter;

namespace budledger::ui {

class GlyphAtlas {
 public:
  // Draws `e` centred at `centre` (logical pixels) into `p`.
  void draw(QPainter& p, QPointF centre, double size, const ReviewEvent& e, bool selected,
            qreal dpr);
  int spriteCount() const { return static_cast<int>(sprites_.size()); }
  void clear() { sprites_.clear(); }

 private:
  QHash<quint64, QPixmap> sprites_;
};

}  // namespace budledger::ui
