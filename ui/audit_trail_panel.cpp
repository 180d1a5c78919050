#include "ui/audit_trail_panel.h"

#include <QComboBox>
#include <QFile>
#include <QFileDialog>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QMessageBox>
#include <QPushButton>
#include <QSet>
#include <QTableView>
#include <QVBoxLayout>

#include "ui/counted.h"

namespace budledger::ui {

AuditTrailPanel::AuditTrailPanel(QWidget* parent) : QWidget(parent) {
  setObjectName(QStringLiteral("auditTrail"));
  model_ = new AuditTrailModel(this);
  filter_ = new AuditTrailFilter(this);
  filter_->setSourceModel(model_);
  view_ = new QTableView(this);
  view_->setObjectName(QStringLiteral("auditTable"));
  view_->setModel(filter_);
  view_->setSelectionBehavior(QAbstractItemView::SelectRows);
  view_->verticalHeader()->hide();
  view_->verticalHeader()->setDefaultSectionSize(view_->fontMetrics().height() + 6);
  view_->horizontalHeader()->setSectionResizeMode(QHeaderView::Interactive);
  view_->horizontalHeader()->setStretchLastSection(true);
  view_->setWordWrap(false);
  view_->setTextElideMode(Qt::ElideMiddle);

  search_ = new QLineEdit(this);
  search_->setObjectName(QStringLiteral("auditSearch"));
  search_->setPlaceholderText(tr("Search who, what, why…"));
  search_->setClearButtonEnabled(true);
  action_ = new QComboBox(this);
  action_->setObjectName(QStringLiteral("auditAction"));
  action_->addItem(tr("All actions"), QString());
  for (const char* a : {"accept", "move", "delete", "add", "set-outcome", "note", "undo", "redo",
                        "sign-off", "revoke", "engine-run"})
    action_->addItem(QString::fromLatin1(a), QString::fromLatin1(a));
  person_ = new QComboBox(this);
  person_->setObjectName(QStringLiteral("auditPerson"));
  auto* exportButton = new QPushButton(tr("Export CSV…"), this);
  exportButton->setObjectName(QStringLiteral("auditExport"));
  count_ = new QLabel(this);

  auto* bar = new QHBoxLayout;
  bar->addWidget(search_, 2);
  bar->addWidget(action_);
  bar->addWidget(person_);
  bar->addWidget(count_, 1);
  bar->addWidget(exportButton);
  auto* l = new QVBoxLayout(this);
  l->setContentsMargins(4, 4, 4, 4);
  l->addLayout(bar);
  l->addWidget(view_, 1);

  auto recount = [this] {
    count_->setText(tr("%1 of %2")
                        .arg(filter_->rowCount())
                        .arg(counted(model_->rowCount(), tr("%1 entry"), tr("%1 entries"))));
  };
  connect(search_, &QLineEdit::textChanged, this, [this, recount](const QString& t) {
    filter_->setText(t);
    recount();
  });
  connect(action_, &QComboBox::currentIndexChanged, this, [this, recount] {
    filter_->setAction(action_->currentData().toString());
    recount();
  });
  connect(person_, &QComboBox::currentIndexChanged, this, [this, recount] {
    filter_->setPerson(person_->currentData().toString());
    recount();
  });
  connect(model_, &QAbstractItemModel::rowsInserted, this, recount);
  connect(model_, &QAbstractItemModel::modelReset, this, recount);
  connect(exportButton, &QPushButton::clicked, this, [this] {
    const QString path = QFileDialog::getSaveFileName(
        this, tr("Export audit trail"), QStringLiteral("audit-trail.csv"), tr("CSV files (*.csv)"));
    if (path.isEmpty()) return;
    if (const QString err = exportCsv(path); !err.isEmpty())
      QMessageBox::critical(this, tr("Cannot export"), err);
  });
  connect(view_, &QTableView::doubleClicked, this, [this](const QModelIndex& i) {
    const auto& e = model_->entry(filter_->mapToSource(i).row());
    if (auto t = store::parseTarget(e.target); t && t->kind == store::Target::Kind::Event)
      emit eventChosen(t->id);
  });
  recount();
}

void AuditTrailPanel::setDatabase(store::Database* db) {
  model_->setDatabase(db);
  refillPeople();
  view_->resizeColumnsToContents();
  // Before/after hold whole records: cap them so every column stays on screen
  // (the full text is in the row's tooltip and the CSV).
  const int cap = fontMetrics().horizontalAdvance(QLatin1Char('x')) * 48;
  for (int c = 0; c < model_->columnCount(); ++c)
    if (view_->columnWidth(c) > cap) view_->setColumnWidth(c, cap);
  view_->scrollToBottom();
}

void AuditTrailPanel::refresh() {
  model_->refresh();
  refillPeople();
  view_->scrollToBottom();
}

void AuditTrailPanel::refillPeople() {
  const QString current = person_->currentData().toString();
  QStringList people;
  QSet<QString> seen;
  for (int r = 0; r < model_->rowCount(); ++r) {
    const QString who = QString::fromStdString(model_->entry(r).actor);
    if (!seen.contains(who)) {
      seen.insert(who);
      people << who;
    }
  }
  people.sort();
  person_->blockSignals(true);
  person_->clear();
  person_->addItem(tr("Everyone"), QString());
  for (const QString& p : people) person_->addItem(p, p);
  person_->setCurrentIndex(std::max(0, person_->findData(current)));
  person_->blockSignals(false);
}

QString AuditTrailPanel::exportCsv(const QString& path) const {
  QFile f(path);
  if (!f.open(QIODevice::WriteOnly | QIODevice::Truncate))
    return tr("%1: %2").arg(path, f.errorString());
  const QByteArray bytes = filter_->toCsv().toUtf8();
  if (f.write(bytes) != bytes.size() || !f.flush()) return tr("%1: %2").arg(path, f.errorString());
  return {};
}

}  // namespace budledger::ui
