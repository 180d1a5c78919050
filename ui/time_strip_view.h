#pragma once
// TimeStripView: the traps of one position as stacked lanes over time — an
// image strip (registered crops, or the compact kymograph when zoomed out)
// with an event lane under it — plus a time axis on top, lane labels at the
// left and the current-frame cursor across everything.
//
// Geometry comes from TimeAxis and StripGeometry; pictures from a
// ThumbnailLoader (optional: without one the strips say so); events and review
// state from a ReviewSession. paintEvent draws only the exposed rectangle and
// never recomputes lifespans. The cursor (lane, frame) is always inside the
// movie when there are lanes. Edits leave as signals; the view never changes
// the project itself.
#include <QAbstractScrollArea>
#include <optional>
#include <vector>

#include "ui/glyph_atlas.h"
#include "ui/review_session.h"
#include "ui/strip_geometry.h"
#include "ui/thumbnail_loader.h"
#include "ui/time_axis.h"

namespace budledger::ui {

class TimeAxisHeader;
class LaneLabelColumn;

class TimeStripView : public QAbstractScrollArea {
  Q_OBJECT

 public:
  static constexpr int kLabelWidth = 148;
  static constexpr int kAxisHeight = 44;

  explicit TimeStripView(QWidget* parent = nullptr);
  ~TimeStripView() override;

  // Neither is owned; both may be null. Resets lanes and cursor.
  void setSession(ReviewSession* session);
  void setLoader(ThumbnailLoader* loader);
  // Shows the given traps (all of one position) in this order.
  void setLanes(int position, std::vector<TrapId> lanes);
  void setEditable(bool editable) { editable_ = editable; }

  ReviewSession* session() const { return session_; }
  ThumbnailLoader* loader() const { return loader_; }
  int position() const { return position_; }
  const std::vector<TrapId>& lanes() const { return lanes_; }
  const TimeAxis& axis() const { return axis_; }
  const StripGeometry& geometry() const { return geometry_; }
  int cursorLane() const { return cursorLane_; }
  int cursorFrame() const { return cursorFrame_; }
  std::optional<TrapId> currentTrap() const;
  // The event the cursor is on (same lane, at the cursor frame), if any.
  const ReviewEvent* eventAtCursor() const;
  std::optional<std::int64_t> selectedEvent() const { return selected_; }

  // Navigation; each keeps the cursor visible.
  void setCursor(int lane, int frame);
  void moveFrames(int delta);
  void moveLanes(int delta);
  // Jumps to the next (+1) or previous (-1) event of the current lane that
  // `filter` accepts (all events when empty); false when there is none.
  bool jumpToEvent(int direction, bool undecidedOnly = false);
  void goToTrap(TrapId trap, std::optional<int> frame = std::nullopt);
  void selectEvent(std::optional<std::int64_t> id);

  void setPixelsPerFrame(double ppf, std::optional<int> anchorViewportX = std::nullopt);
  void zoomBy(double factor);
  void zoomToFit();    // the whole movie across the viewport
  void zoomToCrops();  // one crop at its native width

  // Paints viewport-relative `rect` of the current view; paintEvent calls it,
  // and the benchmark times it.
  void paintViewport(QPainter& p, const QRect& rect);

 signals:
  void cursorChanged(budledger::ui::TrapId trap, int frame);
  void zoomChanged(double pixelsPerFrame);
  // A drag in the event lane asks to move an event; the owner decides.
  void moveRequested(std::int64_t eventId, int frame);

 protected:
  void paintEvent(QPaintEvent* event) override;
  void resizeEvent(QResizeEvent* event) override;
  void scrollContentsBy(int dx, int dy) override;
  bool viewportEvent(QEvent* event) override;
  void mousePressEvent(QMouseEvent* event) override;
  void mouseMoveEvent(QMouseEvent* event) override;
  void mouseReleaseEvent(QMouseEvent* event) override;
  void wheelEvent(QWheelEvent* event) override;

 private:
  friend class TimeAxisHeader;
  friend class LaneLabelColumn;

  void relayout();
  void updateScrollBars();
  void ensureCursorVisible();
  void onTrapChanged(TrapId trap);
  void onThumbnailReady(const ThumbnailKey& key);
  QPointF contentPos(QPointF viewportPos) const;
  // Nearest event of `lane` to content x within a grab distance.
  const ReviewEvent* eventNear(int lane, double contentX) const;
  double glyphSize() const;
  QString tooltipAt(QPoint viewportPos) const;

  void paintStrip(QPainter& p, int lane, std::pair<int, int> frames, double width);
  void paintCrops(QPainter& p, int lane, std::pair<int, int> frames);
  void paintKymograph(QPainter& p, int lane, std::pair<int, int> frames);
  void paintEvents(QPainter& p, int lane, std::pair<int, int> frames, double width);
  void paintCursor(QPainter& p, const QRectF& content);

  ReviewSession* session_ = nullptr;
  ThumbnailLoader* loader_ = nullptr;
  TimeAxisHeader* header_ = nullptr;
  LaneLabelColumn* labels_ = nullptr;
  int position_ = 0;
  std::vector<TrapId> lanes_;
  TimeAxis axis_;
  StripGeometry geometry_;
  QSize cropSize_;
  int cursorLane_ = 0;
  int cursorFrame_ = 0;
  std::optional<std::int64_t> selected_;
  bool editable_ = false;

  struct Drag {
    std::int64_t eventId = 0;
    int lane = 0;
    int fromFrame = 0;
    int toFrame = 0;
  };
  std::optional<Drag> drag_;
  GlyphAtlas atlas_;
};

}  // namespace budledger::ui
