#pragma once
// ReviewQueuePanel: the review queue dock — undecided calls ordered by how
// much they need a person, with the reasons, and Previous/Next buttons that
// walk it. Choosing an item asks to go there; the panel does not move any
// cursor itself.
#include <QWidget>
#include <optional>

#include "ui/review_queue_model.h"

class QLabel;
class QTableView;

namespace budledger::ui {

class ReviewQueuePanel : public QWidget {
  Q_OBJECT

 public:
  explicit ReviewQueuePanel(QWidget* parent = nullptr);
  ReviewQueueModel* model() const { return model_; }
  QTableView* view() const { return view_; }
  // Goes to the item after (+1) or before (-1) the last one chosen and emits
  // itemChosen; false when the queue is empty. When the last item was resolved
  // meanwhile (it left the queue), "after" means the next in queue order.
  bool step(int direction);

 signals:
  void itemChosen(const budledger::ui::ReviewItem& item);

 private:
  void updateCount();
  void choose(int row);
  ReviewQueueModel* model_ = nullptr;
  QTableView* view_ = nullptr;
  QLabel* count_ = nullptr;
  std::optional<ReviewItem> last_;
};

}  // namespace budledger::ui
