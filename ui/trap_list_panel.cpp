#include "ui/trap_list_panel.h"

#include <QComboBox>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QTreeView>
#include <QVBoxLayout>

#include "ui/review_state_mark.h"

namespace budledger::ui {

TrapListPanel::TrapListPanel(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("trapPanel"));
  model_ = new TrapListModel(this);
  filter_ = new TrapFilterModel(this);
  filter_->setSourceModel(model_);
  view_ = new QTreeView(this);
  view_->setObjectName(QStringLiteral("trapList"));
  view_->setModel(filter_);
  view_->setRootIsDecorated(false);
  view_->setUniformRowHeights(true);
  view_->setSortingEnabled(true);
  view_->sortByColumn(TrapListModel::TrapColumn, Qt::AscendingOrder);
  view_->setSelectionMode(QAbstractItemView::SingleSelection);
  view_->setSelectionBehavior(QAbstractItemView::SelectRows);
  view_->header()->setSectionResizeMode(QHeaderView::ResizeToContents);
  view_->header()->setResizeContentsPrecision(0);  // fit the rows on screen, not all of them
  view_->header()->setStretchLastSection(false);

  state_ = new QComboBox(this);
  state_->setObjectName(QStringLiteral("stateFilter"));
  state_->addItem(tr("All states"), -1);
  for (ReviewState s : {ReviewState::NotStarted, ReviewState::InProgress, ReviewState::Reviewed,
                        ReviewState::SignedOff})
    state_->addItem(reviewStateIcon(s), reviewStateName(s), static_cast<int>(s));
  position_ = new QComboBox(this);
  position_->setObjectName(QStringLiteral("positionFilter"));

  auto* filters = new QHBoxLayout;
  filters->addWidget(new QLabel(tr("Show"), this));
  filters->addWidget(state_, 1);
  filters->addWidget(position_, 1);
  auto* l = new QVBoxLayout(this);
  l->setContentsMargins(4, 4, 4, 4);
  l->addLayout(filters);
  l->addWidget(view_, 1);

  connect(state_, &QComboBox::currentIndexChanged, this, [this] {
    const int v = state_->currentData().toInt();
    filter_->setStateFilter(v < 0 ? std::nullopt : std::optional(static_cast<ReviewState>(v)));
  });
  connect(position_, &QComboBox::currentIndexChanged, this, [this] {
    const QVariant v = position_->currentData();
    filter_->setPositionFilter(v.toInt() < 0 ? std::nullopt : std::optional(v.toInt()));
  });
  connect(view_->selectionModel(), &QItemSelectionModel::currentRowChanged, this,
          [this](const QModelIndex& current) {
            if (quiet_ || !current.isValid()) return;
            const int packed = current.data(TrapListModel::kTrapRole).toInt();
            emit trapChosen({packed / 65536, packed % 65536});
          });
}

void TrapListPanel::setSession(ReviewSession* session, const ReviewQueueModel* queue) {
  model_->setSession(session, queue);
  position_->blockSignals(true);
  position_->clear();
  position_->addItem(tr("All positions"), -1);
  if (session)
    for (const auto& p : session->positions())
      position_->addItem(QString::fromStdString(p.name), p.id);
  position_->blockSignals(false);
  filter_->setPositionFilter(std::nullopt);
}

void TrapListPanel::setStateFilter(std::optional<ReviewState> state) {
  const int want = state ? static_cast<int>(*state) : -1;
  state_->setCurrentIndex(state_->findData(want));
}

void TrapListPanel::showCurrent(TrapId trap) {
  const int row = model_->rowOf(trap);
  if (row < 0) return;
  const QModelIndex i = filter_->mapFromSource(model_->index(row, 0));
  if (!i.isValid()) return;
  quiet_ = true;
  view_->setCurrentIndex(i);
  view_->scrollTo(i);
  quiet_ = false;
}

}  // namespace budledger::ui
