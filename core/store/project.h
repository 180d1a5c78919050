#pragma once
// Project: one experiment's SQLite file (design.md, "The project file is the
// experiment's single source of truth"). This class is the only way core,
// the CLI and the UI read or write a project. Writes are transactional: a
// failed or interrupted call leaves the file as it was.
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "core/base/events.h"
#include "core/store/journal.h"
#include "core/store/sqlite.h"
#include "core/store/write_lock.h"

namespace budledger::store {

struct PositionRecord {
  int id = 0;
  std::string name;
  std::string group;  // e.g. strain or condition label
  int frameCount = 0;
  int width = 0;
  int height = 0;
};

struct InputRecord {
  int position = 0;
  std::string path;
  std::int64_t sizeBytes = 0;
  std::string sha256;
};

struct TrapRecord {
  int position = 0;
  int trap = 0;
  int row = 0;
  int col = 0;
  double x = 0;  // centre, frame-0 pixels
  double y = 0;
  bool edge = false;  // cut by the image edge
};

struct DriftRecord {
  int position = 0;
  int frame = 0;
  double dx = 0;
  double dy = 0;
  double confidence = 0;
  double focus = 0;
};

// The engine's per-trap-frame reading: occupancy with class probabilities and
// the cells it measured (features as JSON, documented in docs/project-file.md).
struct MeasurementRecord {
  int position = 0;
  int trap = 0;
  int frame = 0;
  Occupancy occupancy = Occupancy::Empty;
  double pEmpty = 0, pSingle = 0, pBudded = 0, pCrowded = 0;
  int cellCount = 0;
  std::string featuresJson = "{}";
};

struct EngineRun {
  std::int64_t id = 0;
  std::string startedUtc;
  std::string engineVersion;
  std::string parametersJson;
  std::string inputDigest;
};

// How an engine run is recorded in the journal.
struct RunRecording {
  // Positions the run analysed; empty = every position in the project. Its
  // proposals replace the earlier ones of exactly these positions.
  std::vector<int> positions;
  // Who started it; front ends should name the operator.
  Actor by{"engine", "system"};
  std::string reason;
};

// Meta keys every front end shares (docs/project-file.md, "meta").
inline constexpr const char* kMetaIntervalMin = "interval_min";
inline constexpr const char* kMetaPixelUm = "pixel_um";

class Project {
 public:
  // Creates a new project file; refuses to overwrite an existing one.
  static Project create(const std::string& path);
  // Opens a project. ReadWrite takes the project's write lock (write_lock.h);
  // when another process (or another Project in this one) holds it, the
  // project opens read-only instead and readOnlyReason() says who has it —
  // never two writers, never a lost update.
  static Project open(const std::string& path,
                      Database::Access access = Database::Access::ReadWrite);

  const std::string& path() const { return path_; }
  Database& db() { return *db_; }
  bool readOnly() const { return lock_ == nullptr; }
  // One line for a banner, empty when writable.
  const std::string& readOnlyReason() const { return readOnlyReason_; }
  // Throws StoreError with readOnlyReason() when read-only.
  void requireWritable() const;

  void setMeta(const std::string& key, const std::string& value);
  std::optional<std::string> meta(const std::string& key);

  int addPosition(const PositionRecord& p);  // returns the new id
  std::vector<PositionRecord> positions();
  std::optional<PositionRecord> positionByName(const std::string& name);
  void addInput(const InputRecord& in);
  std::vector<InputRecord> inputs();
  void replaceTraps(int position, const std::vector<TrapRecord>& traps);
  std::vector<TrapRecord> traps(std::optional<int> position = std::nullopt);
  void replaceDrift(int position, const std::vector<DriftRecord>& drift);
  std::vector<DriftRecord> drift(int position);

  // A new engine run with its proposals, in one transaction that also
  // journals it and carries earlier decisions over to the new proposals
  // (carry_over.h). Refused while a sign-off covers a position it analyses.
  std::int64_t addEngineRun(const EngineRun& run, const std::vector<Event>& proposals,
                            const RunRecording& recording = {});
  std::optional<EngineRun> latestRun();
  // Every engine run, oldest first (a project grown by several analyses has
  // one run per analysis, each covering its own positions).
  std::vector<EngineRun> runs();
  // Measurements of a run, in one transaction (replacing that run's rows for
  // the same trap-frames).
  void addMeasurements(std::int64_t run, const std::vector<MeasurementRecord>& rows);
  std::vector<MeasurementRecord> measurements(std::int64_t run, int position, int trap);
  // Proposals of a run (default: the latest), ordered by position, trap, frame.
  std::vector<Event> proposals(std::optional<std::int64_t> run = std::nullopt);

 private:
  Project(std::string path, std::unique_ptr<Database> db, std::unique_ptr<WriteLock> lock,
          std::string readOnlyReason);
  void journalUnrecordedRuns();
  std::string path_;
  std::unique_ptr<WriteLock> lock_;  // released after db_ closes (declared first)
  std::unique_ptr<Database> db_;
  std::string readOnlyReason_;
};

// Current UTC time as ISO 8601 with milliseconds, e.g. 2026-12-01T22:09:58.123Z.
std::string utcNowIso();

}  // namespace budledger::store
