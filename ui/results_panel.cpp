#include "ui/results_panel.h"

#include <QHeaderView>
#include <QLabel>
#include <QTreeWidget>
#include <QVBoxLayout>

#include "ui/counted.h"

namespace budledger::ui {

namespace {

QString outcomeName(Outcome o) {
  switch (o) {
    case Outcome::Death:
      return ResultsPanel::tr("died");
    case Outcome::Washout:
      return ResultsPanel::tr("washed out");
    case Outcome::EndOfImaging:
      return ResultsPanel::tr("alive at end");
  }
  return {};
}

}  // namespace

ResultsPanel::ResultsPanel(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("resultsPanel"));
  title_ = new QLabel(this);
  title_->setObjectName(QStringLiteral("resultsTitle"));
  title_->setWordWrap(true);
  table_ = new QTreeWidget(this);
  table_->setObjectName(QStringLiteral("tenureTable"));
  table_->setRootIsDecorated(false);
  table_->setHeaderLabels(
      {tr("Mother"), tr("Frames"), tr("Hours"), tr("Divisions"), tr("Outcome")});
  table_->header()->setSectionResizeMode(QHeaderView::ResizeToContents);
  table_->setMinimumHeight(90);
  intervals_ = new QLabel(this);
  intervals_->setObjectName(QStringLiteral("intervals"));
  intervals_->setWordWrap(true);
  intervals_->setTextInteractionFlags(Qt::TextSelectableByMouse);
  auto* l = new QVBoxLayout(this);
  l->setContentsMargins(6, 6, 6, 6);
  l->addWidget(title_);
  l->addWidget(table_, 1);
  l->addWidget(intervals_);
  refresh();
}

void ResultsPanel::setSession(ReviewSession* session) {
  if (session_) disconnect(session_, nullptr, this, nullptr);
  session_ = session;
  trap_.reset();
  if (session_)
    connect(session_, &ReviewSession::trapChanged, this, [this](TrapId t) {
      if (trap_ && *trap_ == t) refresh();
    });
  refresh();
}

void ResultsPanel::showTrap(std::optional<TrapId> trap) {
  if (trap == trap_) return;
  trap_ = trap;
  refresh();
}

QString ResultsPanel::summary() const { return title_->text(); }

void ResultsPanel::refresh() {
  table_->clear();
  intervals_->clear();
  if (!session_ || !trap_) {
    title_->setText(tr("No trap selected."));
    return;
  }
  const auto& tenures = session_->tenures(*trap_);
  const auto interval = session_->intervalMinutes();
  int divisions = 0;
  for (const auto& t : tenures) divisions += t.divisions;
  title_->setText(
      tr("<b>Position %1, trap %2</b>: %3, %4")
          .arg(trap_->position)
          .arg(trap_->trap)
          .arg(counted(static_cast<long>(tenures.size()), tr("%1 mother"), tr("%1 mothers")),
               counted(divisions, tr("%1 division"), tr("%1 divisions"))));
  QStringList lines;
  for (const auto& t : tenures) {
    const int frames = t.lastFrame - t.firstFrame + 1;
    auto* item = new QTreeWidgetItem(
        table_, {QString::number(t.mother + 1), tr("%1–%2").arg(t.firstFrame).arg(t.lastFrame),
                 interval ? QString::number(frames * *interval / 60.0, 'f', 1) : tr("—"),
                 QString::number(t.divisions), outcomeName(t.outcome)});
    item->setTextAlignment(2, Qt::AlignRight);
    item->setTextAlignment(3, Qt::AlignRight);
    if (t.separationFrames.size() > 1) {
      QStringList gaps;
      for (size_t i = 1; i < t.separationFrames.size(); ++i) {
        const int d = t.separationFrames[i] - t.separationFrames[i - 1];
        gaps << (interval ? QString::number(std::lround(d * *interval)) : QString::number(d));
      }
      lines << tr("Mother %1 intervals (%2): %3")
                   .arg(t.mother + 1)
                   .arg(interval ? tr("min") : tr("frames"), gaps.join(QStringLiteral(", ")));
    }
  }
  intervals_->setText(lines.join(QLatin1Char('\n')));
}

}  // namespace budledger::ui
