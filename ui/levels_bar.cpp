#include "ui/levels_bar.h"

#include <QHBoxLayout>
#include <QLabel>
#include <QPushButton>
#include <QSlider>
#include <cmath>

namespace budledger::ui {

namespace {
// Contrast on a log scale: slider 0..100 maps to 1x..32x.
constexpr double kMaxContrastLog2 = 5.0;
}  // namespace

LevelsBar::LevelsBar(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("levelsBar"));
  brightness_ = new QSlider(Qt::Horizontal, this);
  brightness_->setObjectName(QStringLiteral("brightness"));
  brightness_->setRange(0, 100);
  brightness_->setToolTip(tr("Brightness"));
  contrast_ = new QSlider(Qt::Horizontal, this);
  contrast_->setObjectName(QStringLiteral("contrast"));
  contrast_->setRange(0, 100);
  contrast_->setToolTip(tr("Contrast"));
  auto* autoButton = new QPushButton(tr("Auto"), this);
  autoButton->setObjectName(QStringLiteral("autoLevels"));
  autoButton->setToolTip(tr("Levels from the current trap's crop (L)"));
  auto* l = new QHBoxLayout(this);
  l->setContentsMargins(0, 0, 0, 0);
  l->addWidget(new QLabel(tr("Brightness"), this));
  l->addWidget(brightness_, 1);
  l->addWidget(new QLabel(tr("Contrast"), this));
  l->addWidget(contrast_, 1);
  l->addWidget(autoButton);
  connect(brightness_, &QSlider::valueChanged, this, &LevelsBar::fromSliders);
  connect(contrast_, &QSlider::valueChanged, this, &LevelsBar::fromSliders);
  connect(autoButton, &QPushButton::clicked, this, &LevelsBar::autoRequested);
  setLevels({});
}

void LevelsBar::setLevels(const DisplayLevels& levels) {
  levels_ = levels.normalised();
  updating_ = true;
  brightness_->setValue(static_cast<int>(std::lround(levels_.brightness() * 100)));
  contrast_->setValue(
      static_cast<int>(std::lround(std::log2(levels_.contrast()) / kMaxContrastLog2 * 100)));
  updating_ = false;
}

void LevelsBar::fromSliders() {
  if (updating_) return;
  const double b = brightness_->value() / 100.0;
  const double c = std::exp2(contrast_->value() / 100.0 * kMaxContrastLog2);
  levels_ = DisplayLevels::fromBrightnessContrast(b, c);
  emit levelsChanged(levels_);
}

}  // namespace budledger::ui
