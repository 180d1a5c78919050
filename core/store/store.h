#pragma once
// budledger::store — the project file (SQLite) and everything that keeps it
// honest: schema and migrations, the Project API, the journal of decisions
// (journal.h) and the Editor every front end edits through (editor.h),
// replay into the materialised current state (replay.h, materialised.h),
// current lifespans and their digests (lifespans.h), sign-offs, carry-over on
// re-analysis (carry_over.h, reanalysis.h), verify, merge, and the
// one-writer lock (write_lock.h).
#include "core/store/carry_over.h"
#include "core/store/current_event.h"
#include "core/store/editor.h"
#include "core/store/journal.h"
#include "core/store/lifespans.h"
#include "core/store/materialised.h"
#include "core/store/merge.h"
#include "core/store/project.h"
#include "core/store/replay.h"
#include "core/store/schema.h"
#include "core/store/scope.h"
#include "core/store/signoff.h"
#include "core/store/sqlite.h"
#include "core/store/verify.h"
#include "core/store/write_lock.h"
