#pragma once
// EventLegend: the key to the event shape code — each kind's shape and name,
// then each decision drawn on the same shape — painted with the very
// functions the strips use, so the key can never disagree with the strips.
// Items flow onto a second line when the window is narrow (never clipped).
#include <QWidget>
#include <vector>

namespace budledger::ui {

class EventLegend : public QWidget {
  Q_OBJECT

 public:
  explicit EventLegend(QWidget* parent = nullptr);
  QSize sizeHint() const override;
  QSize minimumSizeHint() const override;
  bool hasHeightForWidth() const override { return true; }
  int heightForWidth(int width) const override;

 protected:
  void paintEvent(QPaintEvent* event) override;

 private:
  struct Item {
    int kind = -1;      // EventKind index, or -1
    int decision = -1;  // Decision index, or -1
    QString text;
    int width = 0;
  };
  std::vector<Item> items() const;
  // Top-left of each item when laid out in `width`; returns the rows used.
  int layout(int width, std::vector<QPoint>* at) const;
  int rowHeight() const;
};

}  // namespace budledger::ui
