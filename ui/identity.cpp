#include "ui/identity.h"

#include <QComboBox>
#include <QDialogButtonBox>
#include <QFormLayout>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QVBoxLayout>

namespace budledger::ui {

QStringList Identity::roles() {
  return {QStringLiteral("technician"), QStringLiteral("reviewer"), piRole()};
}

Identity Identity::load(QSettings& settings) {
  return {settings.value(QStringLiteral("identity/name")).toString(),
          settings.value(QStringLiteral("identity/role")).toString()};
}

void Identity::save(QSettings& settings) const {
  settings.setValue(QStringLiteral("identity/name"), name.trimmed());
  settings.setValue(QStringLiteral("identity/role"), role);
}

IdentityDialog::IdentityDialog(const Identity& current, const QString& why, QWidget* parent)
    : QDialog(parent) {
  setWindowTitle(tr("Who is reviewing?"));
  setObjectName(QStringLiteral("identityDialog"));
  name_ = new QLineEdit(current.name, this);
  name_->setObjectName(QStringLiteral("identityName"));
  name_->setPlaceholderText(tr("Your name, as it should appear in the journal"));
  role_ = new QComboBox(this);
  role_->setObjectName(QStringLiteral("identityRole"));
  role_->addItems(Identity::roles());
  if (!current.role.isEmpty()) role_->setCurrentText(current.role);
  auto* text = new QLabel(why, this);
  text->setWordWrap(true);
  auto* form = new QFormLayout;
  form->addRow(tr("Name"), name_);
  form->addRow(tr("Role"), role_);
  auto* buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, this);
  auto* ok = buttons->button(QDialogButtonBox::Ok);
  ok->setEnabled(!current.name.trimmed().isEmpty());
  connect(name_, &QLineEdit::textChanged, this,
          [ok](const QString& t) { ok->setEnabled(!t.trimmed().isEmpty()); });
  connect(buttons, &QDialogButtonBox::accepted, this, &QDialog::accept);
  connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
  auto* l = new QVBoxLayout(this);
  l->addWidget(text);
  l->addLayout(form);
  l->addWidget(buttons);
}

Identity IdentityDialog::identity() const {
  return {name_->text().trimmed(), role_->currentText()};
}

}  // namespace budledger::ui
