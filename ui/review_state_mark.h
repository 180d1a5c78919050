#pragma once
// Review-state marks: one small shape per state so the trap list and lane
// labels read without colour — hollow ring (not started), half-filled ring (in
// progress), filled disc with a tick (reviewed), padlock (signed off).
#include <QIcon>
#include <QRectF>

#include "ui/review_session.h"

class QPainter;

namespace budledger::ui {

void paintReviewStateMark(QPainter& p, const QRectF& box, ReviewState state);
// The same mark as an icon (rendered once per size and device-pixel ratio by QIcon's engine).
QIcon reviewStateIcon(ReviewState state);

}  // namespace budledger::ui
