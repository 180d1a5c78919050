#pragma once
// TimeAxisHeader: the axis above the time strips — elapsed time (h:mm) and
// frame numbers at round steps, with the current frame flagged. It paints
// from its TimeStripView's TimeAxis and scroll offset; it holds no state.
#include <QWidget>

namespace budledger::ui {

class TimeStripView;

class TimeAxisHeader : public QWidget {
  Q_OBJECT

 public:
  explicit TimeAxisHeader(TimeStripView* view);

 protected:
  void paintEvent(QPaintEvent* event) override;
  void mousePressEvent(QMouseEvent* event) override;

 private:
  TimeStripView* view_;
};

}  // namespace budledger::ui
