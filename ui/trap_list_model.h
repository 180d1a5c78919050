#pragma once
// TrapListModel: one row per trap of the project with its review state (a
// shape icon and a word), division count, undecided calls and review need;
// TrapFilterModel narrows it by state and position. Rows follow the session:
// a changed trap updates its row only.
#include <QAbstractTableModel>
#include <QSortFilterProxyModel>
#include <optional>
#include <vector>

#include "ui/review_queue_model.h"
#include "ui/review_session.h"

namespace budledger::ui {

class TrapListModel : public QAbstractTableModel {
  Q_OBJECT

 public:
  enum Column { TrapColumn, StateColumn, DivisionsColumn, OpenColumn, NeedColumn, ColumnCount };
  static constexpr int kTrapRole = Qt::UserRole + 1;   // QVariant of position*65536+trap
  static constexpr int kStateRole = Qt::UserRole + 2;  // int(ReviewState)

  explicit TrapListModel(QObject* parent = nullptr);
  void setSession(ReviewSession* session, const ReviewQueueModel* queue);

  int rowCount(const QModelIndex& parent = {}) const override;
  int columnCount(const QModelIndex& parent = {}) const override;
  QVariant data(const QModelIndex& index, int role) const override;
  QVariant headerData(int section, Qt::Orientation o, int role) const override;

  TrapId trapAt(int row) const { return traps_[static_cast<size_t>(row)]; }
  int rowOf(TrapId trap) const;

 private:
  void refresh(TrapId trap);

  ReviewSession* session_ = nullptr;
  const ReviewQueueModel* queue_ = nullptr;
  std::vector<TrapId> traps_;
};

class TrapFilterModel : public QSortFilterProxyModel {
  Q_OBJECT

 public:
  explicit TrapFilterModel(QObject* parent = nullptr);
  void setStateFilter(std::optional<ReviewState> state);
  void setPositionFilter(std::optional<int> position);

 protected:
  bool filterAcceptsRow(int row, const QModelIndex& parent) const override;
  bool lessThan(const QModelIndex& a, const QModelIndex& b) const override;

 private:
  std::optional<ReviewState> state_;
  std::optional<int> position_;
};

}  // namespace budledger::ui
