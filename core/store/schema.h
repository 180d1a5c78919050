#pragma once
// The project file's schema as an ordered list of forward migrations. The
// database's PRAGMA user_version is the number of migrations applied; opening
// an older file applies the rest in one transaction, a newer file is refused.
// Every table and column is documented in docs/project-file.md.
#include "core/store/sqlite.h"

namespace budledger::store {

int latestSchemaVersion();
// Brings `db` up to the latest version; throws StoreError for a file written
// by a newer BudLedger or one that is not a BudLedger project.
void migrate(Database& db);

}  // namespace budledger::store
