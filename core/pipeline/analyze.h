#pragma once
// analyzePosition(): the one function the command-line tool and the
// workstation both call to run the stages that exist over one position:
//   survey   a few frames spread over the movie give the trap lattice (its
//            autocorrelation does not depend on drift) and the reference frame
//   register every frame in order, on the static structure, with continuity
//            (decoding runs on a second thread, input digests on a third)
//   traps    the temporal median of registered frames gives the trap layout
//   refine + every frame once more: the drift refined on the structure that
//   stages   persists through the movie, and FrameStage plug-ins shown every
//            frame's registered trap crops
//   write    position, inputs (path, size, SHA-256), drift, traps and the
//            stages' results in one transaction
// Memory is bounded by a few frames plus the projection's sample, however
// long the movie. Progress is reported per stage; a CancelToken is honoured
// between frames (Cancelled is thrown and nothing is written). The pipeline
// runs its own threads; callers on small machines do well to switch OpenCV's
// worker pool off (cv::setNumThreads(1)), as budledger-cli analyze does.
#include <filesystem>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "core/base/progress.h"
#include "core/io/frame_source.h"
#include "core/pipeline/frame_stage.h"
#include "core/register/drift_tracker.h"
#include "core/register/registrar.h"
#include "core/store/project.h"
#include "core/traps/lattice.h"
#include "core/traps/trap_finder.h"
#include "core/traps/trap_layout.h"
#include "core/traps/traps_csv.h"

namespace budledger::pipeline {

struct AnalyzeOptions {
  std::string positionName;  // empty: the source's own (file name stem)
  std::string group;
  std::optional<double> intervalMin;  // override the stack's metadata
  std::optional<double> pixelUm;
  // A user-supplied layout (rows for other positions are ignored) and the
  // file it came from, for messages. Detection still runs to size the crops
  // but its failure is then not an error.
  const std::vector<traps::SuppliedTrap>* suppliedTraps = nullptr;
  std::filesystem::path suppliedTrapsFile;

  registration::RegistrationOptions registration;
  registration::TrackOptions tracking;
  traps::LatticeOptions lattice;
  traps::TrapFinderOptions finder;
  int surveyFrames = 4;         // frames the lattice is first estimated from
  int referenceCandidates = 4;  // the sharpest of the first few frames is the reference
  int projectionFrames = 15;    // frames in the temporal median (fewer for very large frames)
  std::size_t projectionBudgetBytes = std::size_t{96} << 20;
  int readAhead = 3;  // decoded frames buffered ahead of registration
  // Refine every frame once more with weights on the structure that persists
  // through the movie (cells seated in most traps otherwise count as chip,
  // and bias the drift as they grow); shares its pass with the stages.
  bool secondLook = true;
  bool digests = true;  // SHA-256 of every input file
};

struct AnalyzeTimings {
  double survey = 0, registration = 0, traps = 0, stages = 0, digests = 0, write = 0, total = 0;
};

// Everything analyzePosition() found, before (or without) writing it.
struct PositionAnalysis {
  std::string name;
  io::StackInfo info;
  std::optional<double> intervalMin, pixelUm;
  registration::DriftTrack drift;
  traps::TrapLayout layout;
  std::optional<traps::Lattice> surveyLattice;
  int referenceFrame = 0;
  std::vector<std::string> sha256;  // per info.files entry; empty strings when digests are off
  std::string note;                 // e.g. why no lattice was used for registration
  int positionId = 0;               // set once written
  AnalyzeTimings seconds;
};

// Runs every stage except writing. Throws InputError for bad input (naming
// file and frame) and Cancelled.
PositionAnalysis analyzeFrames(io::FrameSource& source, const AnalyzeOptions& options,
                               const Progress& progress, std::span<FrameStage* const> stages = {});

// Writes an analysis (and the stages' results via FrameStage::commit) into
// `project` in one transaction; returns the new position id. Throws
// InputError if the position's name is already taken.
int writePosition(store::Project& project, const PositionAnalysis& analysis,
                  const AnalyzeOptions& options, std::span<FrameStage* const> stages = {});

// analyzeFrames() then writePosition(). The name is checked against the
// project before any work.
PositionAnalysis analyzePosition(store::Project& project, io::FrameSource& source,
                                 const AnalyzeOptions& options, const Progress& progress,
                                 std::span<FrameStage* const> stages = {});

}  // namespace budledger::pipeline
