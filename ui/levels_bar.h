#pragma once
// LevelsBar: brightness and contrast sliders with an Auto button, the
// display controls of the crops. It edits a DisplayLevels value and says so;
// it does not know where images come from (the owner does auto levels).
#include <QWidget>

#include "ui/display_levels.h"

class QSlider;

namespace budledger::ui {

class LevelsBar : public QWidget {
  Q_OBJECT

 public:
  explicit LevelsBar(QWidget* parent = nullptr);
  DisplayLevels levels() const { return levels_; }
  // Updates the sliders without emitting levelsChanged.
  void setLevels(const DisplayLevels& levels);

 signals:
  void levelsChanged(const budledger::ui::DisplayLevels& levels);
  void autoRequested();

 private:
  void fromSliders();
  QSlider* brightness_ = nullptr;
  QSlider* contrast_ = nullptr;
  DisplayLevels levels_;
  bool updating_ = false;
};

}  // namespace budledger::ui
