#include "ui/review_queue_panel.h"

#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QPushButton>
#include <QTableView>
#include <QVBoxLayout>

#include "ui/counted.h"

namespace budledger::ui {

ReviewQueuePanel::ReviewQueuePanel(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("reviewQueue"));
  model_ = new ReviewQueueModel(this);
  view_ = new QTableView(this);
  view_->setObjectName(QStringLiteral("reviewQueueTable"));
  view_->setModel(model_);
  view_->setSelectionBehavior(QAbstractItemView::SelectRows);
  view_->setSelectionMode(QAbstractItemView::SingleSelection);
  view_->verticalHeader()->hide();
  view_->verticalHeader()->setDefaultSectionSize(view_->fontMetrics().height() + 6);
  view_->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
  // Columns fit the rows on screen: measuring every row of a long queue after
  // each edit cost more than the rest of the edit's repaint.
  view_->horizontalHeader()->setResizeContentsPrecision(0);
  view_->verticalHeader()->setResizeContentsPrecision(0);
  view_->horizontalHeader()->setStretchLastSection(true);
  view_->setWordWrap(false);
  auto* prev = new QPushButton(tr("◀ Previous"), this);
  auto* next = new QPushButton(tr("Next ▶"), this);
  prev->setToolTip(tr("Previous item needing review (Shift+Q)"));
  next->setToolTip(tr("Next item needing review (Q)"));
  count_ = new QLabel(this);
  auto* row = new QHBoxLayout;
  row->addWidget(count_, 1);
  row->addWidget(prev);
  row->addWidget(next);
  auto* l = new QVBoxLayout(this);
  l->setContentsMargins(4, 4, 4, 4);
  l->addLayout(row);
  l->addWidget(view_, 1);
  connect(prev, &QPushButton::clicked, this, [this] { step(-1); });
  connect(next, &QPushButton::clicked, this, [this] { step(+1); });
  connect(view_, &QTableView::clicked, this, [this](const QModelIndex& i) { choose(i.row()); });
  connect(model_, &QAbstractItemModel::modelReset, this, &ReviewQueuePanel::updateCount);
  updateCount();
}

void ReviewQueuePanel::choose(int row) {
  last_ = model_->item(row);
  view_->setCurrentIndex(model_->index(row, 0));
  view_->scrollTo(model_->index(row, 0));
  emit itemChosen(*last_);
}

bool ReviewQueuePanel::step(int direction) {
  const auto& rows = model_->items();
  const int n = static_cast<int>(rows.size());
  if (n == 0) return false;
  int row = direction > 0 ? 0 : n - 1;
  if (last_) {
    auto same = std::find_if(rows.begin(), rows.end(), [this](const ReviewItem& i) {
      return i.eventId == last_->eventId && i.trap == last_->trap;
    });
    if (same != rows.end()) {
      row = static_cast<int>(same - rows.begin()) + direction;
    } else {
      // Resolved meanwhile: the first item that sorted after it takes its place.
      const auto after = std::find_if(
          rows.begin(), rows.end(), [this](const ReviewItem& i) { return comesBefore(*last_, i); });
      row = static_cast<int>(after - rows.begin()) + (direction > 0 ? 0 : -1);
    }
    row = (row % n + n) % n;
  }
  choose(row);
  return true;
}

void ReviewQueuePanel::updateCount() {
  count_->setText(counted(model_->rowCount(), tr("%1 call to look at"), tr("%1 calls to look at")));
}

}  // namespace budledger::ui
