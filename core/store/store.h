#pragma once
// budledger::store — the project file (SQLite): schema and migrations, the
// Project API every front end reads and writes through.
#include "core/store/project.h"
#include "core/store/schema.h"
#include "core/store/sqlite.h"
