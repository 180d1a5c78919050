#pragma once
// NewProjectDialog: File → New project from images. The user adds stacks or
// folders of single-frame TIFFs (each row is one position, opened through
// core/io so a bad file is refused at once with its cause), types a strain
// and a condition per position, checks the interval and pixel size (filled
// from the first input's metadata until the user edits them) and names the
// project file. plan() is what AnalysisDialog runs.
//
// Invariants: every row was opened successfully; position names are unique;
// Analyse is enabled only when the plan is complete.
#include <QDialog>
#include <QString>
#include <QStringList>
#include <optional>
#include <vector>

#include "core/io/frame_source.h"
#include "ui/project_build.h"

class QDoubleSpinBox;
class QLabel;
class QLineEdit;
class QPushButton;
class QTableWidget;

namespace budledger::ui {

class NewProjectDialog : public QDialog {
  Q_OBJECT

 public:
  enum Column { kPosition, kSource, kFrames, kSize, kStrain, kCondition, kColumns };

  explicit NewProjectDialog(QWidget* parent = nullptr);

  // Adds stack files / every position of a folder. Returns why an input was
  // refused (nothing of that input is added), or nullopt.
  std::optional<QString> addStacks(const QStringList& files);
  std::optional<QString> addFolder(const QString& folder, const QString& pattern = {});
  void setGroup(int row, const QString& strain, const QString& condition);
  void setTarget(const QString& path);

  int positionCount() const;
  std::optional<double> intervalMinutes() const;
  std::optional<double> pixelUm() const;
  QString metadataNote() const;
  QString target() const;
  QTableWidget* table() const { return table_; }
  QPushButton* analyseButton() const { return analyse_; }
  // The plan as the dialog stands (complete when analyseButton() is enabled).
  NewProjectPlan plan() const;

 private:
  struct Row {
    PositionInput input;
    std::optional<double> intervalMin, pixelUm;  // from its metadata
    int frames = 0, width = 0, height = 0;
  };
  static Row rowFor(PositionInput input, const io::StackInfo& info);
  std::optional<QString> addRows(std::vector<Row> rows);
  void chooseStacks();
  void chooseFolder();
  void chooseTarget();
  void removeSelected();
  void refreshMetadata();
  void updateAnalyse();
  void showRefusal(const std::optional<QString>& why);

  std::vector<Row> rows_;
  QTableWidget* table_ = nullptr;
  QDoubleSpinBox* interval_ = nullptr;
  QDoubleSpinBox* pixel_ = nullptr;
  QLabel* metaNote_ = nullptr;
  QLineEdit* pattern_ = nullptr;
  QLineEdit* target_ = nullptr;
  QPushButton* analyse_ = nullptr;
  bool intervalEdited_ = false, pixelEdited_ = false, targetEdited_ = false;
};

}  // namespace budledger::ui
