#include "ui/shortcuts_dialog.h"

#include <QDialogButtonBox>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QKeySequenceEdit>
#include <QLabel>
#include <QPushButton>
#include <QTreeWidget>
#include <QVBoxLayout>

namespace budledger::ui {

ShortcutsDialog::ShortcutsDialog(KeyMap& keys, QWidget* parent) : QDialog(parent), keys_(keys) {
  setWindowTitle(tr("Keyboard shortcuts"));
  setObjectName(QStringLiteral("shortcutsDialog"));
  table_ = new QTreeWidget(this);
  table_->setHeaderLabels({tr("Command"), tr("Keys")});
  table_->setRootIsDecorated(false);
  table_->setUniformRowHeights(true);
  table_->header()->setSectionResizeMode(0, QHeaderView::ResizeToContents);
  table_->header()->setStretchLastSection(true);

  editor_ = new QKeySequenceEdit(this);
  auto* assign = new QPushButton(tr("&Assign"), this);
  auto* clear = new QPushButton(tr("&Clear keys"), this);
  auto* reset = new QPushButton(tr("&Reset all to defaults"), this);
  message_ = new QLabel(this);
  message_->setWordWrap(true);

  auto* editRow = new QHBoxLayout;
  editRow->addWidget(new QLabel(tr("New key for the selected command:"), this));
  editRow->addWidget(editor_, 1);
  editRow->addWidget(assign);
  editRow->addWidget(clear);
  auto* buttons = new QDialogButtonBox(QDialogButtonBox::Close, this);
  buttons->addButton(reset, QDialogButtonBox::ResetRole);

  auto* layout = new QVBoxLayout(this);
  layout->addWidget(new QLabel(
      tr("Keys act on the time strips when they have the keyboard focus (click them or press "
         "Esc). Changes are kept for next time."),
      this));
  layout->addWidget(table_, 1);
  layout->addLayout(editRow);
  layout->addWidget(message_);
  layout->addWidget(buttons);

  connect(assign, &QPushButton::clicked, this, &ShortcutsDialog::assign);
  connect(clear, &QPushButton::clicked, this, &ShortcutsDialog::clearKeys);
  connect(reset, &QPushButton::clicked, this, [this] {
    keys_.resetToDefaults();
    message_->setText(tr("All keys are back to their defaults."));
  });
  connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
  connect(&keys_, &KeyMap::changed, this, &ShortcutsDialog::fill);
  fill();
  resize(620, 640);
}

void ShortcutsDialog::fill() {
  const auto selected = selectedCommand();
  table_->clear();
  std::optional<CommandGroup> group;
  for (const auto& i : KeyMap::commands()) {
    if (group != i.group) {
      auto* g = new QTreeWidgetItem(table_, {KeyMap::groupTitle(i.group)});
      QFont f = g->font(0);
      f.setBold(true);
      g->setFont(0, f);
      g->setFlags(Qt::ItemIsEnabled);
      group = i.group;
    }
    auto* item = new QTreeWidgetItem(table_, {i.title, KeyMap::keysText(keys_.keys(i.command))});
    item->setData(0, Qt::UserRole, static_cast<int>(i.command));
    if (selected && *selected == i.command) table_->setCurrentItem(item);
  }
}

std::optional<Command> ShortcutsDialog::selectedCommand() const {
  const QTreeWidgetItem* item = table_->currentItem();
  if (!item || !item->data(0, Qt::UserRole).isValid()) return std::nullopt;
  return static_cast<Command>(item->data(0, Qt::UserRole).toInt());
}

void ShortcutsDialog::assign() {
  const auto c = selectedCommand();
  // Only the first chord counts: multi-chord sequences are slow to type when proofreading.
  const QKeySequence typed = editor_->keySequence();
  const QKeySequence key = typed.isEmpty() ? typed : QKeySequence(typed[0]);
  if (!c || key.isEmpty()) {
    message_->setText(tr("Select a command and press a key in the box first."));
    return;
  }
  const QList<Command> taken = keys_.conflicts(*c, key);
  if (!taken.isEmpty()) {
    message_->setText(
        tr("%1 is already used by “%2”; clear it there first.")
            .arg(key.toString(QKeySequence::NativeText), KeyMap::info(taken.first()).title));
    return;
  }
  keys_.setKeys(*c, {key});
  editor_->clear();
  message_->setText(
      tr("“%1” is now %2.").arg(KeyMap::info(*c).title, key.toString(QKeySequence::NativeText)));
}

void ShortcutsDialog::clearKeys() {
  if (const auto c = selectedCommand()) {
    keys_.setKeys(*c, {});
    message_->setText(tr("“%1” has no key now.").arg(KeyMap::info(*c).title));
  }
}

}  // namespace budledger::ui
