#include "ui/glyph_atlas.h"

#include <QPainter>
#include <cmath>

#include "ui/event_glyphs.h"

namespace budledger::ui {

namespace {
// Room for the selection ring (0.78 size radius) and the badge up and right.
constexpr double kSpriteScale = 2.0;
}  // namespace

void GlyphAtlas::draw(QPainter& p, QPointF centre, double size, const ReviewEvent& e, bool selected,
                      qreal dpr) {
  const int level = static_cast<int>(std::lround(std::clamp(e.event.confidence, 0.0, 1.0) * 20));
  const int sizeKey = static_cast<int>(std::lround(size * 4));
  const int dprKey = static_cast<int>(std::lround(dpr * 100));
  const quint64 key = (quint64(static_cast<unsigned>(e.event.kind)) << 56) |
                      (quint64(static_cast<unsigned>(e.decision)) << 48) | (quint64(level) << 40) |
                      (quint64(selected) << 39) | (quint64(sizeKey & 0xFFFF) << 16) |
                      quint64(dprKey & 0xFFFF);
  auto it = sprites_.find(key);
  const double side = std::ceil(size * kSpriteScale);
  if (it == sprites_.end()) {
    QPixmap px(
        QSize(static_cast<int>(std::ceil(side * dpr)), static_cast<int>(std::ceil(side * dpr))));
    px.setDevicePixelRatio(dpr);
    px.fill(Qt::transparent);
    QPainter sp(&px);
    ReviewEvent look = e;
    look.event.confidence = level / 20.0;
    glyphs::paint(sp, {side / 2, side / 2}, size, look, {selected});
    sp.end();
    it = sprites_.insert(key, px);
  }
  p.drawPixmap(QPointF(centre.x() - side / 2, centre.y() - side / 2), *it);
}

}  // namespace budledger::ui
