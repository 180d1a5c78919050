#pragma once
// NoteDialog: a note on the current event, tenure or trap, with the reason
// the journal records beside it. Both fields are plain text; the note is
// required, the reason may stay empty only when the note says it all.
#include <QDialog>

class QComboBox;
class QLineEdit;
class QPlainTextEdit;

namespace budledger::ui {

class NoteDialog : public QDialog {
  Q_OBJECT

 public:
  enum class About { Event, Tenure, Trap };
  // `targets` lists what the note can be about here, first = default.
  NoteDialog(const QList<QPair<About, QString>>& targets, QWidget* parent = nullptr);
  About about() const;
  QString text() const;
  QString reason() const;

 private:
  QComboBox* about_ = nullptr;
  QPlainTextEdit* text_ = nullptr;
  QLineEdit* reason_ = nullptr;
};

}  // namespace budledger::ui
