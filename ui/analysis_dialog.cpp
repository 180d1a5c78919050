#include "ui/analysis_dialog.h"

#include <opencv2/core/utility.hpp>

#include <QCloseEvent>
#include <QDialogButtonBox>
#include <QLabel>
#include <QProgressBar>
#include <QPushButton>
#include <QVBoxLayout>
#include <QtConcurrent>
#include <cmath>

#include "core/base/error.h"
#include "ui/counted.h"

namespace budledger::ui {

AnalysisDialog::AnalysisDialog(NewProjectPlan plan, QWidget* parent)
    : QDialog(parent), plan_(std::move(plan)) {
  setObjectName(QStringLiteral("analysisDialog"));
  setWindowTitle(tr("Analysing images"));
  auto* what =
      new QLabel(tr("Building %1 from %2. Registration, trap finding and the engine run here; the "
                    "project opens when they are done.")
                     .arg(QString::fromStdString(plan_.target.filename().string()),
                          counted(static_cast<long>(plan_.positions.size()), tr("%1 position"),
                                  tr("%1 positions"))),
                 this);
  what->setWordWrap(true);
  stage_ = new QLabel(tr("Opening the images…"), this);
  stage_->setObjectName(QStringLiteral("analysisStage"));
  bar_ = new QProgressBar(this);
  bar_->setObjectName(QStringLiteral("analysisProgress"));
  bar_->setRange(0, 100);
  auto* buttons = new QDialogButtonBox(QDialogButtonBox::Cancel, this);
  cancel_ = buttons->button(QDialogButtonBox::Cancel);
  cancel_->setObjectName(QStringLiteral("analysisCancel"));
  connect(buttons, &QDialogButtonBox::rejected, this, &AnalysisDialog::cancel);
  connect(&watcher_, &QFutureWatcher<Outcome>::finished, this, &AnalysisDialog::onDone);
  auto* l = new QVBoxLayout(this);
  l->addWidget(what);
  l->addSpacing(6);
  l->addWidget(stage_);
  l->addWidget(bar_);
  l->addWidget(buttons);
  setMinimumWidth(480);
}

AnalysisDialog::~AnalysisDialog() {
  token_.cancel();
  watcher_.waitForFinished();
}

void AnalysisDialog::start() {
  if (state_ != State::Ready) return;
  state_ = State::Running;
  // The pipeline runs its own threads (decoding and digests beside
  // registration); OpenCV's pool on top would only make them queue.
  cv::setNumThreads(1);
  const NewProjectPlan plan = plan_;
  Progress progress;
  progress.cancel = &token_;
  // Called on the worker for every frame: pass on only visible changes.
  auto last = std::make_shared<std::pair<std::string, int>>();
  progress.report = [this, last](std::string_view stage, double fraction) {
    const int pc = static_cast<int>(std::lround(std::clamp(fraction, 0.0, 1.0) * 100));
    if (last->first == stage && last->second == pc) return;
    *last = {std::string(stage), pc};
    const QString s = QString::fromUtf8(stage.data(), static_cast<qsizetype>(stage.size()));
    QMetaObject::invokeMethod(
        this, [this, s, fraction] { onProgress(s, fraction); }, Qt::QueuedConnection);
  };
  watcher_.setFuture(QtConcurrent::run([plan, progress] {
    Outcome out;
    try {
      for (const auto& line : buildProject(plan, progress))
        out.lines << QString::fromStdString(line);
      out.kind = Outcome::Kind::Done;
    } catch (const Cancelled&) {
      out.kind = Outcome::Kind::Cancelled;
    } catch (const std::exception& e) {
      out.why = QString::fromStdString(e.what());
    }
    return out;
  }));
}

void AnalysisDialog::cancel() {
  if (state_ != State::Running) {
    QDialog::reject();
    return;
  }
  token_.cancel();
  cancel_->setEnabled(false);
  stage_->setText(tr("Cancelling — stopping at the next frame…"));
}

void AnalysisDialog::reject() { cancel(); }

QString AnalysisDialog::stageText() const { return stage_->text(); }
int AnalysisDialog::percent() const { return bar_->value(); }

void AnalysisDialog::onProgress(const QString& stage, double fraction) {
  if (token_.cancelled()) return;
  stage_->setText(stage);
  bar_->setValue(static_cast<int>(std::lround(std::clamp(fraction, 0.0, 1.0) * 100)));
  emit progressed(stage, fraction);
}

void AnalysisDialog::onDone() {
  state_ = State::Done;
  const Outcome out = watcher_.result();
  switch (out.kind) {
    case Outcome::Kind::Done:
      bar_->setValue(100);
      accept();
      emit finished(QString::fromStdString(plan_.target.string()), out.lines);
      break;
    case Outcome::Kind::Cancelled:
      QDialog::reject();
      emit cancelled();
      break;
    case Outcome::Kind::Failed:
      QDialog::reject();
      emit failed(out.why);
      break;
  }
}

}  // namespace budledger::ui
