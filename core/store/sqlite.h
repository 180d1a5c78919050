#pragma once
// A thin RAII layer over the SQLite C API: a connection, prepared statements
// with typed binds and reads, and a transaction guard that rolls back unless
// committed. Every failure throws StoreError carrying SQLite's message.
#include <sqlite3.h>

#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>

namespace budledger::store {

class StoreError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

class Statement;

class Database {
 public:
  enum class Access { ReadWrite, ReadOnly };
  // Opens (ReadWrite creates) the file; applies WAL, foreign keys, FULL sync.
  Database(const std::string& path, Access access);
  ~Database();
  Database(const Database&) = delete;
  Database& operator=(const Database&) = delete;

  void exec(std::string_view sql);
  Statement prepare(std::string_view sql);
  std::int64_t lastInsertId() const;
  int changes() const;
  sqlite3* handle() const { return db_; }
  Access access() const { return access_; }

 private:
  sqlite3* db_ = nullptr;
  Access access_;
};

class Statement {
 public:
  Statement(sqlite3* db, std::string_view sql);
  ~Statement();
  Statement(Statement&& other) noexcept;
  Statement(const Statement&) = delete;
  Statement& operator=(const Statement&) = delete;
  Statement& operator=(Statement&&) = delete;

  // Binds are 1-based, as in SQLite.
  Statement& bind(int index, std::int64_t value);
  Statement& bind(int index, int value) { return bind(index, static_cast<std::int64_t>(value)); }
  Statement& bind(int index, double value);
  Statement& bind(int index, std::string_view value);
  Statement& bind(int index, const char* value) { return bind(index, std::string_view(value)); }
  Statement& bindNull(int index);

  // Returns true while a row is available.
  bool step();
  // Runs to completion (for statements without result rows).
  void run();
  void reset();

  std::int64_t int64(int column) const;
  int integer(int column) const { return static_cast<int>(int64(column)); }
  double real(int column) const;
  std::string text(int column) const;
  bool isNull(int column) const;

 private:
  sqlite3* db_;
  sqlite3_stmt* stmt_ = nullptr;
};

// BEGIN IMMEDIATE on construction; ROLLBACK on destruction unless commit() ran.
// Inside an open transaction it becomes a SAVEPOINT, so a caller can group
// several Project writes (each transactional on its own) into one.
class Transaction {
 public:
  explicit Transaction(Database& db);
  ~Transaction();
  Transaction(const Transaction&) = delete;
  Transaction& operator=(const Transaction&) = delete;
  void commit();

 private:
  Database& db_;
  bool done_ = false;
  bool nested_ = false;
};

}  // namespace budledger::store
