#pragma once
// ShortcutsDialog: Help → Keyboard shortcuts. Lists every command of the
// KeyMap by group with its keys, and lets the user change them: select a row,
// press the new key in the editor, Assign. Changes are stored at once (the
// KeyMap persists them); conflicts are named before they are made.
#include <QDialog>
#include <optional>

#include "ui/key_map.h"

class QKeySequenceEdit;
class QLabel;
class QTreeWidget;

namespace budledger::ui {

class ShortcutsDialog : public QDialog {
  Q_OBJECT

 public:
  ShortcutsDialog(KeyMap& keys, QWidget* parent = nullptr);
  QTreeWidget* table() const { return table_; }

 private:
  void fill();
  void assign();
  void clearKeys();
  std::optional<Command> selectedCommand() const;

  KeyMap& keys_;
  QTreeWidget* table_ = nullptr;
  QKeySequenceEdit* editor_ = nullptr;
  QLabel* message_ = nullptr;
};

}  // namespace budledger::ui
