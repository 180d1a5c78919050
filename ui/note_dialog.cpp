#include "ui/note_dialog.h"

#include <QComboBox>
#include <QDialogButtonBox>
#include <QFormLayout>
#include <QLineEdit>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QVBoxLayout>

namespace budledger::ui {

NoteDialog::NoteDialog(const QList<QPair<About, QString>>& targets, QWidget* parent)
    : QDialog(parent) {
  setWindowTitle(tr("Add a note"));
  setObjectName(QStringLiteral("noteDialog"));
  about_ = new QComboBox(this);
  about_->setObjectName(QStringLiteral("noteAbout"));
  for (const auto& [kind, label] : targets) about_->addItem(label, static_cast<int>(kind));
  text_ = new QPlainTextEdit(this);
  text_->setObjectName(QStringLiteral("noteText"));
  text_->setPlaceholderText(tr("What you saw, e.g. “daughter stays attached for 3 frames”"));
  text_->setTabChangesFocus(true);
  reason_ = new QLineEdit(this);
  reason_->setObjectName(QStringLiteral("noteReason"));
  reason_->setPlaceholderText(tr("Why it matters, e.g. “division count may be one low”"));
  auto* form = new QFormLayout;
  form->addRow(tr("About"), about_);
  form->addRow(tr("Note"), text_);
  form->addRow(tr("Reason"), reason_);
  auto* buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, this);
  auto* ok = buttons->button(QDialogButtonBox::Ok);
  ok->setEnabled(false);
  connect(text_, &QPlainTextEdit::textChanged, this,
          [this, ok] { ok->setEnabled(!text_->toPlainText().trimmed().isEmpty()); });
  connect(buttons, &QDialogButtonBox::accepted, this, &QDialog::accept);
  connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
  auto* l = new QVBoxLayout(this);
  l->addLayout(form);
  l->addWidget(buttons);
  resize(460, 260);
}

NoteDialog::About NoteDialog::about() const {
  return static_cast<About>(about_->currentData().toInt());
}
QString NoteDialog::text() const { return text_->toPlainText().trimmed(); }
QString NoteDialog::reason() const { return reason_->text().trimmed(); }

}  // namespace budledger::ui
