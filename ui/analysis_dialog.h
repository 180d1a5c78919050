#pragma once
// AnalysisDialog: runs buildProject() for a NewProjectPlan on a worker thread
// (QtConcurrent) and shows its progress: the position and stage, a bar, and
// Cancel. Exactly one of finished(), failed() or cancelled() is emitted, once,
// after the worker has returned; the dialog never closes under a running
// worker (closing it asks to cancel, and its destructor cancels and waits).
#include <QDialog>
#include <QFutureWatcher>
#include <QString>
#include <memory>
#include <optional>

#include "core/base/progress.h"
#include "ui/project_build.h"

class QLabel;
class QProgressBar;
class QPushButton;

namespace budledger::ui {

class AnalysisDialog : public QDialog {
  Q_OBJECT

 public:
  explicit AnalysisDialog(NewProjectPlan plan, QWidget* parent = nullptr);
  ~AnalysisDialog() override;

  // Starts the worker (once).
  void start();
  bool running() const { return state_ == State::Running; }
  // Asks the worker to stop at its next frame.
  void cancel();
  QString stageText() const;
  int percent() const;
  QPushButton* cancelButton() const { return cancel_; }
  const NewProjectPlan& plan() const { return plan_; }

 signals:
  // On the UI thread, for every change the bar shows.
  void progressed(const QString& stage, double fraction);
  void finished(const QString& projectPath, const QStringList& summary);
  void failed(const QString& why);
  void cancelled();

 protected:
  void reject() override;  // Escape and the close button cancel first

 private:
  struct Outcome {
    enum class Kind { Done, Failed, Cancelled } kind = Kind::Failed;
    QStringList lines;
    QString why;
  };
  void onProgress(const QString& stage, double fraction);
  void onDone();

  enum class State { Ready, Running, Done };
  NewProjectPlan plan_;
  State state_ = State::Ready;
  CancelToken token_;
  QFutureWatcher<Outcome> watcher_;
  QLabel* stage_ = nullptr;
  QProgressBar* bar_ = nullptr;
  QPushButton* cancel_ = nullptr;
};

}  // namespace budledger::ui
