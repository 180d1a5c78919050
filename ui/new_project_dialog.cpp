#include "ui/new_project_dialog.h"

#include <QDialogButtonBox>
#include <QDir>
#include <QDoubleSpinBox>
#include <QFileDialog>
#include <QFileInfo>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QMessageBox>
#include <QPushButton>
#include <QSignalBlocker>
#include <QTableWidget>
#include <QVBoxLayout>
#include <cmath>
#include <set>

#include "core/io/frame_source.h"
#include "core/io/image_folder.h"

namespace budledger::ui {
namespace {

QString q(const std::string& s) { return QString::fromStdString(s); }

QTableWidgetItem* fixedItem(const QString& text) {
  auto* item = new QTableWidgetItem(text);
  item->setFlags(item->flags() & ~Qt::ItemIsEditable);
  return item;
}

bool near(double a, double b) { return std::abs(a - b) <= 1e-6 * std::max(std::abs(a), 1.0); }

}  // namespace

NewProjectDialog::NewProjectDialog(QWidget* parent) : QDialog(parent) {
  setObjectName(QStringLiteral("newProjectDialog"));
  setWindowTitle(tr("New project from images"));

  auto* addStacksButton = new QPushButton(tr("Add &stacks…"), this);
  addStacksButton->setToolTip(tr("Multi-page TIFF, OME-TIFF or BigTIFF files, one per position"));
  auto* addFolderButton = new QPushButton(tr("Add &folder…"), this);
  addFolderButton->setToolTip(tr("A folder of single-frame TIFFs (one or more positions)"));
  auto* removeButton = new QPushButton(tr("&Remove"), this);
  pattern_ = new QLineEdit(this);
  pattern_->setObjectName(QStringLiteral("folderPattern"));
  pattern_->setPlaceholderText(tr("file names, e.g. {position}_t{time}.tif (empty: one position)"));
  connect(addStacksButton, &QPushButton::clicked, this, &NewProjectDialog::chooseStacks);
  connect(addFolderButton, &QPushButton::clicked, this, &NewProjectDialog::chooseFolder);
  connect(removeButton, &QPushButton::clicked, this, &NewProjectDialog::removeSelected);

  table_ = new QTableWidget(0, kColumns, this);
  table_->setObjectName(QStringLiteral("newProjectPositions"));
  table_->setHorizontalHeaderLabels(
      {tr("Position"), tr("Images"), tr("Frames"), tr("Size (px)"), tr("Strain"), tr("Condition")});
  table_->verticalHeader()->hide();
  table_->setSelectionBehavior(QAbstractItemView::SelectRows);
  table_->setEditTriggers(QAbstractItemView::AllEditTriggers);
  auto* header = table_->horizontalHeader();
  header->setSectionResizeMode(QHeaderView::ResizeToContents);
  header->setSectionResizeMode(kSource, QHeaderView::Stretch);
  header->setMinimumSectionSize(90);
  connect(table_, &QTableWidget::itemChanged, this, [this](QTableWidgetItem* item) {
    const size_t r = static_cast<size_t>(item->row());
    if (r >= rows_.size()) return;
    if (item->column() == kStrain) rows_[r].input.strain = item->text().trimmed().toStdString();
    if (item->column() == kCondition)
      rows_[r].input.condition = item->text().trimmed().toStdString();
  });

  interval_ = new QDoubleSpinBox(this);
  interval_->setObjectName(QStringLiteral("intervalMinutes"));
  interval_->setRange(0, 24 * 60);
  interval_->setDecimals(2);
  interval_->setSuffix(tr(" min"));
  interval_->setSpecialValueText(tr("unknown"));
  pixel_ = new QDoubleSpinBox(this);
  pixel_->setObjectName(QStringLiteral("pixelUm"));
  pixel_->setRange(0, 100);
  pixel_->setDecimals(4);
  pixel_->setSingleStep(0.01);
  pixel_->setSuffix(tr(" µm"));
  pixel_->setSpecialValueText(tr("unknown"));
  connect(interval_, &QDoubleSpinBox::valueChanged, this, [this] {
    intervalEdited_ = true;
    updateAnalyse();
  });
  connect(pixel_, &QDoubleSpinBox::valueChanged, this, [this] {
    pixelEdited_ = true;
    updateAnalyse();
  });
  metaNote_ = new QLabel(tr("Add images to read their metadata."), this);
  metaNote_->setObjectName(QStringLiteral("metadataNote"));
  metaNote_->setWordWrap(true);

  target_ = new QLineEdit(this);
  target_->setObjectName(QStringLiteral("projectTarget"));
  target_->setPlaceholderText(tr("where the new .budledger file goes"));
  connect(target_, &QLineEdit::textEdited, this, [this] {
    targetEdited_ = true;
    updateAnalyse();
  });
  auto* browse = new QPushButton(tr("Choose…"), this);
  connect(browse, &QPushButton::clicked, this, &NewProjectDialog::chooseTarget);

  auto* inputs = new QHBoxLayout;
  inputs->addWidget(addStacksButton);
  inputs->addWidget(addFolderButton);
  inputs->addWidget(pattern_, 1);
  inputs->addWidget(removeButton);
  auto* targetRow = new QHBoxLayout;
  targetRow->addWidget(target_, 1);
  targetRow->addWidget(browse);
  auto* form = new QFormLayout;
  form->addRow(tr("Frame interval"), interval_);
  form->addRow(tr("Pixel size"), pixel_);
  form->addRow(QString(), metaNote_);
  form->addRow(tr("Project file"), targetRow);

  auto* buttons = new QDialogButtonBox(QDialogButtonBox::Cancel, this);
  analyse_ = buttons->addButton(tr("&Analyse"), QDialogButtonBox::AcceptRole);
  analyse_->setObjectName(QStringLiteral("analyseButton"));
  analyse_->setEnabled(false);
  connect(buttons, &QDialogButtonBox::accepted, this, [this] {
    if (QFileInfo::exists(target())) {
      showRefusal(tr("%1 already exists; a new project never replaces a file. Choose "
                     "another name.")
                      .arg(target()));
      return;
    }
    accept();
  });
  connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);

  auto* hint = new QLabel(
      tr("One row per position. Strain and condition name the groups the survival curves "
         "compare; type them in the table."),
      this);
  hint->setWordWrap(true);
  auto* l = new QVBoxLayout(this);
  l->addLayout(inputs);
  l->addWidget(table_, 1);
  l->addWidget(hint);
  l->addLayout(form);
  l->addWidget(buttons);
  resize(820, 520);
}

NewProjectDialog::Row NewProjectDialog::rowFor(PositionInput input, const io::StackInfo& info) {
  Row r;
  r.input = std::move(input);
  r.intervalMin = info.metadata.intervalMin;
  r.pixelUm = info.metadata.pixelUmX;
  r.frames = info.frames;
  r.width = info.width;
  r.height = info.height;
  return r;
}

std::optional<QString> NewProjectDialog::addStacks(const QStringList& files) {
  std::vector<Row> rows;
  for (const QString& f : files) {
    try {
      auto src = io::openStack(f.toStdString());
      PositionInput in;
      in.name = src->info().positionName;
      in.stack = f.toStdString();
      rows.push_back(rowFor(std::move(in), src->info()));
    } catch (const std::exception& e) {
      return q(e.what());
    }
  }
  return addRows(std::move(rows));
}

std::optional<QString> NewProjectDialog::addFolder(const QString& folder, const QString& pattern) {
  std::vector<Row> rows;
  try {
    for (auto& fp : io::scanFolder(folder.toStdString(), pattern.trimmed().toStdString())) {
      auto src = io::openFolderPosition(fp);
      PositionInput in;
      in.name = fp.name;
      in.folder = std::move(fp);
      rows.push_back(rowFor(std::move(in), src->info()));
    }
  } catch (const std::exception& e) {
    return q(e.what());
  }
  return addRows(std::move(rows));
}

std::optional<QString> NewProjectDialog::addRows(std::vector<Row> rows) {
  std::set<std::string> names;
  for (const auto& r : rows_) names.insert(r.input.name);
  for (const auto& r : rows)
    if (!names.insert(r.input.name).second)
      return tr("%1: position '%2' is already in the list (positions are named after their "
                "files)")
          .arg(q(r.input.where().string()), q(r.input.name));
  QSignalBlocker block(table_);
  for (auto& r : rows) {
    const int row = table_->rowCount();
    table_->insertRow(row);
    table_->setItem(row, kPosition, fixedItem(q(r.input.name)));
    auto* where = fixedItem(q(r.input.where().filename().string()));
    where->setToolTip(q(r.input.where().string()));
    table_->setItem(row, kSource, where);
    table_->setItem(row, kFrames, fixedItem(QString::number(r.frames)));
    table_->setItem(row, kSize, fixedItem(tr("%1 × %2").arg(r.width).arg(r.height)));
    table_->setItem(row, kStrain, new QTableWidgetItem(q(r.input.strain)));
    table_->setItem(row, kCondition, new QTableWidgetItem(q(r.input.condition)));
    rows_.push_back(std::move(r));
  }
  if (!targetEdited_ && !rows_.empty()) {
    const auto& first = rows_.front().input;
    const QFileInfo where(q(first.where().string()));
    const QDir dir = first.folder ? QFileInfo(where.absoluteFilePath()).dir() : where.dir();
    const QString base = first.folder ? where.fileName() : dir.dirName();
    target_->setText(
        dir.filePath((base.isEmpty() ? tr("experiment") : base) + QStringLiteral(".budledger")));
  }
  refreshMetadata();
  return std::nullopt;
}

void NewProjectDialog::setGroup(int row, const QString& strain, const QString& condition) {
  table_->item(row, kStrain)->setText(strain);
  table_->item(row, kCondition)->setText(condition);
}

void NewProjectDialog::setTarget(const QString& path) {
  target_->setText(path);
  targetEdited_ = true;
  updateAnalyse();
}

void NewProjectDialog::refreshMetadata() {
  // The first input that records a value fills the field, unless the user
  // has typed one; inputs that disagree are named so the choice is conscious.
  auto fill = [this](QDoubleSpinBox* box, bool edited, auto get, const QString& what,
                     const QString& unit) -> QString {
    const Row* from = nullptr;
    for (const auto& r : rows_)
      if (get(r)) {
        from = &r;
        break;
      }
    if (!from) {
      if (!edited) {
        QSignalBlocker b(box);
        box->setValue(0);
      }
      return tr("The images do not record the %1; enter it.").arg(what);
    }
    const double v = *get(*from);
    if (!edited) {
      QSignalBlocker b(box);
      box->setValue(v);
    }
    QStringList differ;
    for (const auto& r : rows_)
      if (get(r) && !near(*get(r), v))
        differ << tr("%1 says %2%3").arg(q(r.input.name)).arg(*get(r)).arg(unit);
    QString s = tr("%1 from the metadata of %2: %3%4.")
                    .arg(what.left(1).toUpper() + what.mid(1), q(from->input.name))
                    .arg(v)
                    .arg(unit);
    if (!differ.isEmpty())
      s += QLatin1Char(' ') +
           tr("Inputs disagree (%1); the value above is used for all.").arg(differ.join(tr("; ")));
    return s;
  };
  if (rows_.empty()) {
    metaNote_->setText(tr("Add images to read their metadata."));
  } else {
    const QString a = fill(
        interval_, intervalEdited_, [](const Row& r) { return r.intervalMin; },
        tr("frame interval"), tr(" min"));
    const QString b = fill(
        pixel_, pixelEdited_, [](const Row& r) { return r.pixelUm; }, tr("pixel size"), tr(" µm"));
    metaNote_->setText(a + QLatin1Char('\n') + b);
  }
  updateAnalyse();
}

void NewProjectDialog::updateAnalyse() {
  analyse_->setEnabled(!rows_.empty() && intervalMinutes() && pixelUm() && !target().isEmpty());
}

int NewProjectDialog::positionCount() const { return static_cast<int>(rows_.size()); }

std::optional<double> NewProjectDialog::intervalMinutes() const {
  return interval_->value() > 0 ? std::optional(interval_->value()) : std::nullopt;
}

std::optional<double> NewProjectDialog::pixelUm() const {
  return pixel_->value() > 0 ? std::optional(pixel_->value()) : std::nullopt;
}

QString NewProjectDialog::metadataNote() const { return metaNote_->text(); }
QString NewProjectDialog::target() const { return target_->text().trimmed(); }

NewProjectPlan NewProjectDialog::plan() const {
  NewProjectPlan p;
  p.target = target().toStdString();
  for (const auto& r : rows_) p.positions.push_back(r.input);
  p.intervalMin = intervalMinutes();
  p.pixelUm = pixelUm();
  return p;
}

void NewProjectDialog::showRefusal(const std::optional<QString>& why) {
  if (why) QMessageBox::warning(this, tr("Cannot use these images"), *why);
}

void NewProjectDialog::chooseStacks() {
  const QStringList files = QFileDialog::getOpenFileNames(
      this, tr("Add stacks"), QString(), tr("TIFF stacks (*.tif *.tiff);;All files (*)"));
  if (!files.isEmpty()) showRefusal(addStacks(files));
}

void NewProjectDialog::chooseFolder() {
  const QString dir = QFileDialog::getExistingDirectory(this, tr("Add a folder of TIFFs"));
  if (!dir.isEmpty()) showRefusal(addFolder(dir, pattern_->text()));
}

void NewProjectDialog::chooseTarget() {
  const QString path = QFileDialog::getSaveFileName(this, tr("New project file"), target(),
                                                    tr("BudLedger projects (*.budledger)"));
  if (path.isEmpty()) return;
  setTarget(path.endsWith(QStringLiteral(".budledger")) ? path
                                                        : path + QStringLiteral(".budledger"));
}

void NewProjectDialog::removeSelected() {
  std::set<int, std::greater<>> selected;
  for (const auto& idx : table_->selectionModel()->selectedRows()) selected.insert(idx.row());
  for (int r : selected) {
    table_->removeRow(r);
    rows_.erase(rows_.begin() + r);
  }
  refreshMetadata();
}

}  // namespace budledger::ui
