#include "ui/strip_workspace.h"

#include <QComboBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QToolButton>
#include <QVBoxLayout>

#include "ui/event_legend.h"
#include "ui/levels_bar.h"
#include "ui/time_strip_view.h"

namespace budledger::ui {

StripWorkspace::StripWorkspace(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("stripWorkspace"));
  banner_ = new QLabel(this);
  banner_->setObjectName(QStringLiteral("readOnlyBanner"));
  banner_->setWordWrap(true);
  banner_->hide();
  positions_ = new QComboBox(this);
  positions_->setObjectName(QStringLiteral("positionChooser"));
  positions_->setMinimumContentsLength(14);
  auto tool = [this](const QString& text, const QString& tip) {
    auto* b = new QToolButton(this);
    b->setText(text);
    b->setToolTip(tip);
    b->setAutoRaise(true);
    return b;
  };
  auto* zoomOut = tool(tr("−"), tr("Zoom out (-)"));
  auto* zoomIn = tool(tr("+"), tr("Zoom in (+)"));
  auto* fit = tool(tr("Whole movie"), tr("The whole movie across the window (0)"));
  auto* crops = tool(tr("Full crops"), tr("Crops at full size (1)"));
  levels_ = new LevelsBar(this);
  strips_ = new TimeStripView(this);
  legend_ = new EventLegend(this);

  auto* bar = new QHBoxLayout;
  bar->setContentsMargins(6, 4, 6, 4);
  bar->addWidget(new QLabel(tr("Position"), this));
  bar->addWidget(positions_);
  bar->addSpacing(12);
  bar->addWidget(new QLabel(tr("Zoom"), this));
  bar->addWidget(zoomOut);
  bar->addWidget(zoomIn);
  bar->addWidget(fit);
  bar->addWidget(crops);
  bar->addSpacing(12);
  bar->addWidget(levels_, 1);
  auto* l = new QVBoxLayout(this);
  l->setContentsMargins(0, 0, 0, 0);
  l->setSpacing(0);
  l->addWidget(banner_);
  l->addLayout(bar);
  l->addWidget(strips_, 1);
  l->addWidget(legend_);
  connect(zoomOut, &QToolButton::clicked, this, &StripWorkspace::zoomOutClicked);
  connect(zoomIn, &QToolButton::clicked, this, &StripWorkspace::zoomInClicked);
  connect(fit, &QToolButton::clicked, this, &StripWorkspace::zoomFitClicked);
  connect(crops, &QToolButton::clicked, this, &StripWorkspace::zoomCropsClicked);
}

void StripWorkspace::showBanner(const QString& text) {
  banner_->setText(text);
  banner_->setVisible(!text.isEmpty());
}

}  // namespace budledger::ui
