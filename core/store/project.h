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
#include "core/store/sqlite.h"

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

class Project {
 public:
  // Creates a new project file; refuses to overwrite an existing one.
  static Project create(const std::string& path);
  static Project open(const std::string& path,
                      Database::Access access = Database::Access::ReadWrite);

  const std::string& path() const { return path_; }
  Database& db() { return *db_; }
  bool readOnly() const { return db_->access() == Database::Access::ReadOnly; }

  void setMeta(const std::string& key, const std::string& value);
  std::optional<std::string> meta(const std::string& key);

  int addPosition(const PositionRecord& p);  // returns the new id
  std::vector<PositionRecord> positions();
  void addInput(const InputRecord& in);
  std::vector<InputRecord> inputs();
  void replaceTraps(int position, const std::vector<TrapRecord>& traps);
  std::vector<TrapRecord> traps(std::optional<int> position = std::nullopt);
  void replaceDrift(int position, const std::vector<DriftRecord>& drift);
  std::vector<DriftRecord> drift(int position);

  // A new engine run with its proposals, in one transaction.
  std::int64_t addEngineRun(const EngineRun& run, const std::vector<Event>& proposals);
  std::optional<EngineRun> latestRun();
  // Measurements of a run, in one transaction (replacing that run's rows for
  // the same trap-frames).
  void addMeasurements(std::int64_t run, const std::vector<MeasurementRecord>& rows);
  std::vector<MeasurementRecord> measurements(std::int64_t run, int position, int trap);
  // Proposals of a run (default: the latest), ordered by position, trap, frame.
  std::vector<Event> proposals(std::optional<std::int64_t> run = std::nullopt);

 private:
  Project(std::string path, std::unique_ptr<Database> db);
  std::string path_;
  std::unique_ptr<Database> db_;
};

// Current UTC time as ISO 8601 with milliseconds, e.g. 2026-12-01T22:09:58.123Z.
std::string utcNowIso();

}  // namespace budledger::store
