#pragma once
// Identity: who is at the keyboard and in which role — the Actor every
// journal entry records. Kept in QSettings ("identity/name", "identity/role")
// so a person is asked once per machine account; IdentityDialog asks.
// Roles are the workstation's own short list; a sign-off needs the PI role.
#include <QDialog>
#include <QSettings>
#include <QString>
#include <QStringList>

class QComboBox;
class QLineEdit;

namespace budledger::ui {

struct Identity {
  QString name;
  QString role;
  bool complete() const { return !name.trimmed().isEmpty() && !role.isEmpty(); }

  static QStringList roles();  // "technician", "reviewer", "PI"
  static QString piRole() { return QStringLiteral("PI"); }
  bool isPi() const { return role == piRole(); }

  static Identity load(QSettings& settings);
  void save(QSettings& settings) const;
};

class IdentityDialog : public QDialog {
  Q_OBJECT

 public:
  IdentityDialog(const Identity& current, const QString& why, QWidget* parent = nullptr);
  Identity identity() const;

 private:
  QLineEdit* name_ = nullptr;
  QComboBox* role_ = nullptr;
};

}  // namespace budledger::ui
