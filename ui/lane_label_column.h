#pragma once
// LaneLabelColumn: the fixed column left of the time strips naming each
// lane's trap, its review state (a shape, not only a word) and its current
// division count; the current lane is marked. Paints from its TimeStripView
// and ReviewSession; holds no state.
#include <QWidget>

namespace budledger::ui {

class TimeStripView;

class LaneLabelColumn : public QWidget {
  Q_OBJECT

 public:
  explicit LaneLabelColumn(TimeStripView* view);

 protected:
  void paintEvent(QPaintEvent* event) override;
  void mousePressEvent(QMouseEvent* event) override;
  void wheelEvent(QWheelEvent* event) override;

 private:
  TimeStripView* view_;
};

}  // namespace budledger::ui
