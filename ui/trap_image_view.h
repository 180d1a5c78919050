#pragma once
// TrapImageView: the current trap at the current frame, large, with the cells
// the engine measured outlined and its reading of the frame (occupancy,
// probability, cell count) captioned. The picture comes through the shared
// ThumbnailLoader at native crop size (so it is made off the UI thread and
// shares the cache and display levels with the strips); upscaling uses
// nearest neighbour so a proofreader sees real pixels.
#include <QPointF>
#include <QWidget>
#include <optional>
#include <string>
#include <vector>

#include "ui/review_session.h"
#include "ui/thumbnail_loader.h"

namespace budledger::ui {

// One measured cell, in crop pixel coordinates: the engine records a
// centroid and an equivalent-area diameter, so cells are drawn as circles.
struct CellOutline {
  enum class Role { Mother, Bud, Other };
  QPointF centre;
  double radiusPx = 0;
  Role role = Role::Other;
};

// The cells of a measurement's features JSON ({"cells":[{"x","y",
// "diameter_um","role"}…]}), moved by `origin` into the view's crop; empty
// when the JSON has none or cannot be read.
std::vector<CellOutline> cellsFromFeatures(const std::string& featuresJson, double pixelUm,
                                           QPointF origin);

class TrapImageView : public QWidget {
  Q_OBJECT

 public:
  explicit TrapImageView(QWidget* parent = nullptr);

  void setSession(ReviewSession* session) {
    session_ = session;
    update();
  }
  void setLoader(ThumbnailLoader* loader);
  // Shows a trap at a frame, with the cells the engine measured there.
  void showFrame(TrapId trap, int frame);
  const std::vector<CellOutline>& cells() const { return cells_; }
  // What the caption says (for tests and the status line).
  QString caption() const;
  QSize sizeHint() const override { return {300, 360}; }

 protected:
  void paintEvent(QPaintEvent* event) override;

 private:
  void onReady(const ThumbnailKey& key);
  QRectF imageRect() const;

  ReviewSession* session_ = nullptr;
  ThumbnailLoader* loader_ = nullptr;
  std::optional<TrapId> trap_;
  int frame_ = 0;
  std::vector<CellOutline> cells_;
};

}  // namespace budledger::ui
