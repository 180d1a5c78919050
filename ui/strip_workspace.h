#pragma once
// StripWorkspace: the central area — a read-only banner when the project is
// held elsewhere, a bar with the position chooser, zoom buttons and display
// levels, the time strips, and the key to the event shapes under them.
// Layout only: it forwards nothing and owns no data.
#include <QWidget>

class QComboBox;
class QLabel;

namespace budledger::ui {

class EventLegend;
class LevelsBar;
class TimeStripView;

class StripWorkspace : public QWidget {
  Q_OBJECT

 public:
  explicit StripWorkspace(QWidget* parent = nullptr);
  TimeStripView* strips() const { return strips_; }
  LevelsBar* levels() const { return levels_; }
  QComboBox* positions() const { return positions_; }
  QLabel* banner() const { return banner_; }
  void showBanner(const QString& text);  // empty hides it

 signals:
  void zoomOutClicked();
  void zoomInClicked();
  void zoomFitClicked();
  void zoomCropsClicked();

 private:
  TimeStripView* strips_ = nullptr;
  LevelsBar* levels_ = nullptr;
  QComboBox* positions_ = nullptr;
  QLabel* banner_ = nullptr;
  EventLegend* legend_ = nullptr;
};

}  // namespace budledger::ui
