#pragma once
// ReviewQueueModel: every undecided call that needs a person, across the
// project, ordered by need (review_priority.h), as a table for the review
// queue panel. Recomputes only the changed trap's items when the session says
// a trap changed, then re-sorts. Rows carry the trap and frame to jump to.
#include <QAbstractTableModel>
#include <map>
#include <vector>

#include "ui/review_priority.h"
#include "ui/review_session.h"

namespace budledger::ui {

class ReviewQueueModel : public QAbstractTableModel {
  Q_OBJECT

 public:
  enum Column { NeedColumn, TrapColumn, FrameColumn, KindColumn, WhyColumn, ColumnCount };

  explicit ReviewQueueModel(QObject* parent = nullptr);
  void setSession(ReviewSession* session, PriorityOptions options = {});

  int rowCount(const QModelIndex& parent = {}) const override;
  int columnCount(const QModelIndex& parent = {}) const override;
  QVariant data(const QModelIndex& index, int role) const override;
  QVariant headerData(int section, Qt::Orientation o, int role) const override;

  const ReviewItem& item(int row) const { return rows_[static_cast<size_t>(row)]; }
  const std::vector<ReviewItem>& items() const { return rows_; }
  // Sum of the needs of a trap's items (0 when none): the trap list's "need".
  double trapNeed(TrapId trap) const;
  int trapItemCount(TrapId trap) const;

 signals:
  void trapNeedChanged(budledger::ui::TrapId trap);

 private:
  void recompute(TrapId trap);
  void rebuildRows();

  ReviewSession* session_ = nullptr;
  PriorityOptions options_;
  std::map<TrapId, std::vector<ReviewItem>> byTrap_;
  std::vector<ReviewItem> rows_;
};

}  // namespace budledger::ui
