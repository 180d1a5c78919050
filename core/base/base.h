#pragma once
// budledger::base — the vocabulary every other core folder shares: event kinds,
// input errors that name file and frame, progress and cancellation for long
// work, and SHA-256 digests.
#include "core/base/error.h"
#include "core/base/events.h"
#include "core/base/progress.h"
#include "core/base/sha256.h"
