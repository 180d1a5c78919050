#include "core/store/sqlite.h"

#include <fmt/format.h>

namespace budledger::store {
namespace {
[[noreturn]] void fail(sqlite3* db, std::string_view what) {
  throw StoreError(fmt::format("{}: {}", what, db ? sqlite3_errmsg(db) : "out of memory"));
}
}  // namespace

Database::Database(const std::string& path, Access access) : access_(access) {
  // A read-only Database is a read-write connection that refuses to change
  // anything (query_only): unlike SQLITE_OPEN_READONLY it can tidy the WAL
  // and shared-memory files away when it is the last to close. SQLite falls
  // back to reading only when the file itself is write-protected.
  const int flags = access == Access::ReadOnly ? SQLITE_OPEN_READWRITE
                                               : (SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
  if (sqlite3_open_v2(path.c_str(), &db_, flags | SQLITE_OPEN_NOMUTEX, nullptr) != SQLITE_OK) {
    std::string msg = fmt::format("cannot open project '{}': {}", path,
                                  db_ ? sqlite3_errmsg(db_) : "out of memory");
    sqlite3_close(db_);
    db_ = nullptr;
    throw StoreError(msg);
  }
  sqlite3_busy_timeout(db_, 2000);
  exec("PRAGMA foreign_keys = ON");
  if (access == Access::ReadOnly) exec("PRAGMA query_only = ON");
  if (access == Access::ReadWrite) {
    exec("PRAGMA journal_mode = WAL");
    exec("PRAGMA synchronous = FULL");
  }
}

Database::~Database() { sqlite3_close_v2(db_); }

void Database::exec(std::string_view sql) {
  char* err = nullptr;
  const std::string s(sql);
  if (sqlite3_exec(db_, s.c_str(), nullptr, nullptr, &err) != SQLITE_OK) {
    std::string msg = err ? err : "unknown error";
    sqlite3_free(err);
    throw StoreError(fmt::format("SQL failed ({}): {}", s.substr(0, 60), msg));
  }
}

Statement Database::prepare(std::string_view sql) { return Statement(db_, sql); }
std::int64_t Database::lastInsertId() const { return sqlite3_last_insert_rowid(db_); }
int Database::changes() const { return sqlite3_changes(db_); }

Statement::Statement(sqlite3* db, std::string_view sql) : db_(db) {
  if (sqlite3_prepare_v2(db, sql.data(), static_cast<int>(sql.size()), &stmt_, nullptr) !=
      SQLITE_OK)
    fail(db, fmt::format("prepare '{}'", sql.substr(0, 60)));
}

Statement::~Statement() { sqlite3_finalize(stmt_); }

Statement::Statement(Statement&& other) noexcept : db_(other.db_), stmt_(other.stmt_) {
  other.stmt_ = nullptr;
}

Statement& Statement::bind(int i, std::int64_t v) {
  if (sqlite3_bind_int64(stmt_, i, v) != SQLITE_OK) fail(db_, "bind");
  return *this;
}
Statement& Statement::bind(int i, double v) {
  if (sqlite3_bind_double(stmt_, i, v) != SQLITE_OK) fail(db_, "bind");
  return *this;
}
Statement& Statement::bind(int i, std::string_view v) {
  if (sqlite3_bind_text(stmt_, i, v.data(), static_cast<int>(v.size()), SQLITE_TRANSIENT) !=
      SQLITE_OK)
    fail(db_, "bind");
  return *this;
}
Statement& Statement::bindNull(int i) {
  if (sqlite3_bind_null(stmt_, i) != SQLITE_OK) fail(db_, "bind");
  return *this;
}

bool Statement::step() {
  const int rc = sqlite3_step(stmt_);
  if (rc == SQLITE_ROW) return true;
  if (rc == SQLITE_DONE) return false;
  fail(db_, "step");
}

void Statement::run() {
  while (step()) {
  }
  reset();
}

void Statement::reset() {
  sqlite3_reset(stmt_);
  sqlite3_clear_bindings(stmt_);
}

std::int64_t Statement::int64(int c) const { return sqlite3_column_int64(stmt_, c); }
double Statement::real(int c) const { return sqlite3_column_double(stmt_, c); }
std::string Statement::text(int c) const {
  const auto* p = sqlite3_column_text(stmt_, c);
  return p ? std::string(reinterpret_cast<const char*>(p),
                         static_cast<size_t>(sqlite3_column_bytes(stmt_, c)))
           : std::string();
}
bool Statement::isNull(int c) const { return sqlite3_column_type(stmt_, c) == SQLITE_NULL; }

Transaction::Transaction(Database& db)
    : db_(db), nested_(sqlite3_get_autocommit(db.handle()) == 0) {
  db_.exec(nested_ ? "SAVEPOINT budledger_nested" : "BEGIN IMMEDIATE");
}
Transaction::~Transaction() {
  if (!done_) {
    try {
      db_.exec(nested_ ? "ROLLBACK TO budledger_nested; RELEASE budledger_nested" : "ROLLBACK");
    } catch (...) {
    }
  }
}
void Transaction::commit() {
  db_.exec(nested_ ? "RELEASE budledger_nested" : "COMMIT");
  done_ = true;
}

}  // namespace budledger::store
