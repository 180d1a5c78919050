#pragma once
// Event glyphs: the workstation's own shape code for events, readable without
// colour. Kind is carried by the silhouette (bud ▲, separation ◆, death ■,
// washout ▶-arrow, arrival ●) and, redundantly, by an Okabe–Ito colour;
// decision by the fill and a badge:
//   proposed  thin outline, filled from the bottom up to its confidence
//   accepted  solid fill, dark outline, tick badge
//   moved     solid fill, dark outline, double-arrow badge (+ ghost at the old frame)
//   added     solid fill, dark outline, plus badge
//   rejected  grey hollow outline struck through, faded
// Functions paint on any QPainter (widgets, images, the benchmark), so the code
// is shared by the strips, the legend and the docs.
#include <QColor>
#include <QPainterPath>
#include <QPointF>

#include "ui/review_event.h"

class QPainter;

namespace budledger::ui::glyphs {

// Okabe–Ito colours chosen per kind; distinct also to the common colour-vision
// deficiencies (Okabe & Ito 2008, "Color Universal Design").
QColor kindColour(EventKind kind);
// Colour of the current-frame cursor: strong and unused by any kind.
QColor cursorColour();

// Silhouette of a kind centred at `centre`, fitting a `size` × `size` box.
QPainterPath shape(EventKind kind, QPointF centre, double size);

struct GlyphOptions {
  bool selected = false;  // drawn with a halo ring
};

void paint(QPainter& p, QPointF centre, double size, const ReviewEvent& e,
           GlyphOptions options = {});
// The faint ghost left at the engine's frame when an event was moved, and the
// connector to its new place.
void paintMoveTrace(QPainter& p, QPointF from, QPointF to, double size, EventKind kind);

}  // namespace budledger::ui::glyphs
