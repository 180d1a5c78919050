#pragma once
// AuditTrailModel: the project's journal as a table — who, when (UTC), what
// (action and target), the value before and after, and why — read through
// core/store and appended to as new entries are recorded (the journal only
// grows, so rows never change once shown). AuditTrailFilter narrows it by
// free text, action and person. toCsv() writes the rows a filter lets through.
#include <QAbstractTableModel>
#include <QSortFilterProxyModel>
#include <vector>

#include "core/store/journal.h"
#include "core/store/sqlite.h"

namespace budledger::ui {

class AuditTrailModel : public QAbstractTableModel {
  Q_OBJECT

 public:
  enum Column {
    SeqColumn,
    WhenColumn,
    WhoColumn,
    RoleColumn,
    ActionColumn,
    TargetColumn,
    BeforeColumn,
    AfterColumn,
    WhyColumn,
    ColumnCount
  };

  explicit AuditTrailModel(QObject* parent = nullptr);
  // Reads the whole journal of `db` (nullptr clears).
  void setDatabase(store::Database* db);
  // Appends entries recorded since the last read.
  void refresh();

  int rowCount(const QModelIndex& parent = {}) const override;
  int columnCount(const QModelIndex& parent = {}) const override;
  QVariant data(const QModelIndex& index, int role) const override;
  QVariant headerData(int section, Qt::Orientation o, int role) const override;
  const store::JournalEntry& entry(int row) const { return entries_[static_cast<size_t>(row)]; }
  static QString text(const store::JournalEntry& e, int column);

 private:
  store::Database* db_ = nullptr;
  std::vector<store::JournalEntry> entries_;
};

class AuditTrailFilter : public QSortFilterProxyModel {
  Q_OBJECT

 public:
  explicit AuditTrailFilter(QObject* parent = nullptr);
  void setText(const QString& text);
  void setAction(const QString& action);  // empty: any
  void setPerson(const QString& person);  // empty: anyone
  // RFC 4180 CSV of the rows the filter lets through, with a header row.
  QString toCsv() const;

 protected:
  bool filterAcceptsRow(int row, const QModelIndex& parent) const override;

 private:
  QString text_, action_, person_;
};

}  // namespace budledger::ui
