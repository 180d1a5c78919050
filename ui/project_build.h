#pragma once
// What File → New project from images builds, and the function that builds
// it on a worker thread. Plain C++ over core (no Qt), so a test can run it
// without widgets.
//
// Invariants: buildProject() writes into a hidden partial file beside the
// target and renames it into place only when every position has been
// analysed and the engine run stored; on an error or a cancel nothing is
// left behind and an existing file at the target is never overwritten.
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "core/base/progress.h"
#include "core/io/image_folder.h"

namespace budledger::ui {

// One position to analyse: a stack file, or one position of a folder of
// single-frame TIFFs.
struct PositionInput {
  std::string name;
  std::filesystem::path stack;               // set for a stack
  std::optional<io::FolderPosition> folder;  // set for a folder position
  std::string strain, condition;

  // The statistics group: "strain / condition", or whichever is given.
  std::string group() const;
  // The file or folder, for messages.
  std::filesystem::path where() const { return folder ? folder->folder : stack; }
};

struct NewProjectPlan {
  std::filesystem::path target;  // the .budledger file to create
  std::vector<PositionInput> positions;
  std::optional<double> intervalMin;  // overrides the stacks' metadata
  std::optional<double> pixelUm;
  bool digests = true;  // SHA-256 of every input (off in tests)
};

// The partial file buildProject() writes before publishing it.
std::filesystem::path partialPathFor(const std::filesystem::path& target);

// Analyses every position (ingest, drift, traps, engine) into a new project at
// plan.target. Progress stages are prefixed "name (i/n): ". Returns one line
// per position saying what was found. Throws InputError (bad input, a target
// that exists) or Cancelled.
std::vector<std::string> buildProject(const NewProjectPlan& plan, const Progress& progress);

}  // namespace budledger::ui
