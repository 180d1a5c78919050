#include "core/store/project.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <ctime>
#include <filesystem>

#include <set>

#include "core/store/reanalysis.h"
#include "core/store/schema.h"

namespace budledger::store {

Project::Project(std::string path, std::unique_ptr<Database> db, std::unique_ptr<WriteLock> lock,
                 std::string readOnlyReason)
    : path_(std::move(path)),
      lock_(std::move(lock)),
      db_(std::move(db)),
      readOnlyReason_(std::move(readOnlyReason)) {}

Project Project::create(const std::string& path) {
  if (std::filesystem::exists(path))
    throw StoreError(fmt::format("project '{}' already exists; refusing to overwrite it", path));
  std::string holder;
  auto lock = WriteLock::tryAcquire(path, holder);
  if (!lock) throw StoreError(fmt::format("cannot create project '{}': {}", path, holder));
  auto db = std::make_unique<Database>(path, Database::Access::ReadWrite);
  migrate(*db);
  Project p(path, std::move(db), std::move(lock), "");
  p.setMeta("created_utc", utcNowIso());
  return p;
}

Project Project::open(const std::string& path, Database::Access access) {
  if (!std::filesystem::exists(path))
    throw StoreError(fmt::format("project '{}' does not exist", path));
  std::unique_ptr<WriteLock> lock;
  std::string reason = "opened read-only";
  if (access == Database::Access::ReadWrite) {
    std::string holder;
    lock = WriteLock::tryAcquire(path, holder);
    if (!lock)
      reason = holder.starts_with("cannot")
                   ? fmt::format("read-only: {}", holder)
                   : fmt::format("read-only: another program is writing this project ({})", holder);
  }
  auto db = std::make_unique<Database>(
      path, lock ? Database::Access::ReadWrite : Database::Access::ReadOnly);
  if (lock) {
    migrate(*db);
  } else {
    auto st = db->prepare("PRAGMA user_version");
    st.step();
    if (st.integer(0) != latestSchemaVersion())
      throw StoreError(
          fmt::format("project '{}' has schema version {} and must be migrated, "
                      "which needs it writable ({})",
                      path, st.integer(0), reason));
  }
  Project p(path, std::move(db), std::move(lock), lock ? "" : reason);
  if (!p.readOnly()) p.journalUnrecordedRuns();
  return p;
}

void Project::requireWritable() const {
  if (readOnly()) throw StoreError(fmt::format("project '{}' is {}", path_, readOnlyReason_));
}

// Files made before the journal existed hold runs that no entry records.
// Recording them (in id order, each covering every position, as the latest
// run then did) gives every run its entry and the materialised state its base.
void Project::journalUnrecordedRuns() {
  std::set<std::int64_t> recorded;
  auto st = db_->prepare("SELECT target FROM journal WHERE action = 'engine-run'");
  while (st.step())
    if (auto t = parseTarget(st.text(0))) recorded.insert(t->id);
  std::vector<std::int64_t> missing;
  auto runs = db_->prepare("SELECT id FROM engine_runs ORDER BY id");
  while (runs.step())
    if (!recorded.contains(runs.int64(0))) missing.push_back(runs.int64(0));
  if (missing.empty()) return;
  std::vector<int> all;
  for (const auto& p : positions()) all.push_back(p.id);
  Transaction tx(*db_);
  for (auto run : missing)
    journalEngineRun(*db_, run, all, Actor{"budledger", "system"},
                     "engine run made before this project had a journal");
  tx.commit();
}

void Project::setMeta(const std::string& key, const std::string& value) {
  requireWritable();
  db_->prepare(
         "INSERT INTO meta(key, value) VALUES (?1, ?2) "
         "ON CONFLICT(key) DO UPDATE SET value = excluded.value")
      .bind(1, key)
      .bind(2, value)
      .run();
}

std::optional<std::string> Project::meta(const std::string& key) {
  auto st = db_->prepare("SELECT value FROM meta WHERE key = ?1");
  st.bind(1, key);
  if (st.step()) return st.text(0);
  return std::nullopt;
}

int Project::addPosition(const PositionRecord& p) {
  requireWritable();
  db_->prepare(
         "INSERT INTO positions(name, group_name, frame_count, width, height) "
         "VALUES (?1, ?2, ?3, ?4, ?5)")
      .bind(1, p.name)
      .bind(2, p.group)
      .bind(3, p.frameCount)
      .bind(4, p.width)
      .bind(5, p.height)
      .run();
  return static_cast<int>(db_->lastInsertId());
}

std::vector<PositionRecord> Project::positions() {
  std::vector<PositionRecord> out;
  auto st = db_->prepare(
      "SELECT id, name, group_name, frame_count, width, height FROM positions ORDER BY id");
  while (st.step())
    out.push_back(
        {st.integer(0), st.text(1), st.text(2), st.integer(3), st.integer(4), st.integer(5)});
  return out;
}

void Project::addInput(const InputRecord& in) {
  requireWritable();
  db_->prepare("INSERT INTO inputs(position_id, path, size_bytes, sha256) VALUES (?1,?2,?3,?4)")
      .bind(1, in.position)
      .bind(2, in.path)
      .bind(3, in.sizeBytes)
      .bind(4, in.sha256)
      .run();
}

std::optional<PositionRecord> Project::positionByName(const std::string& name) {
  for (auto& p : positions())
    if (p.name == name) return p;
  return std::nullopt;
}

std::vector<InputRecord> Project::inputs() {
  std::vector<InputRecord> out;
  auto st = db_->prepare("SELECT position_id, path, size_bytes, sha256 FROM inputs ORDER BY id");
  while (st.step()) out.push_back({st.integer(0), st.text(1), st.int64(2), st.text(3)});
  return out;
}

void Project::replaceTraps(int position, const std::vector<TrapRecord>& traps) {
  requireWritable();
  Transaction tx(*db_);
  db_->prepare("DELETE FROM traps WHERE position_id = ?1").bind(1, position).run();
  auto ins = db_->prepare(
      "INSERT INTO traps(position_id, trap_id, row, col, x, y, edge) VALUES "
      "(?1,?2,?3,?4,?5,?6,?7)");
  for (const auto& t : traps) {
    ins.bind(1, position).bind(2, t.trap).bind(3, t.row).bind(4, t.col).bind(5, t.x).bind(6, t.y);
    ins.bind(7, t.edge ? 1 : 0).run();
  }
  tx.commit();
}

std::vector<TrapRecord> Project::traps(std::optional<int> position) {
  std::vector<TrapRecord> out;
  auto st = db_->prepare(
      "SELECT position_id, trap_id, row, col, x, y, edge FROM traps "
      "WHERE ?1 IS NULL OR position_id = ?1 ORDER BY position_id, trap_id");
  if (position) st.bind(1, *position);
  while (st.step())
    out.push_back({st.integer(0), st.integer(1), st.integer(2), st.integer(3), st.real(4),
                   st.real(5), st.integer(6) != 0});
  return out;
}

void Project::replaceDrift(int position, const std::vector<DriftRecord>& drift) {
  requireWritable();
  Transaction tx(*db_);
  db_->prepare("DELETE FROM drift WHERE position_id = ?1").bind(1, position).run();
  auto ins = db_->prepare(
      "INSERT INTO drift(position_id, frame, dx, dy, confidence, focus) VALUES "
      "(?1,?2,?3,?4,?5,?6)");
  for (const auto& d : drift)
    ins.bind(1, position)
        .bind(2, d.frame)
        .bind(3, d.dx)
        .bind(4, d.dy)
        .bind(5, d.confidence)
        .bind(6, d.focus)
        .run();
  tx.commit();
}

std::vector<DriftRecord> Project::drift(int position) {
  std::vector<DriftRecord> out;
  auto st = db_->prepare(
      "SELECT position_id, frame, dx, dy, confidence, focus FROM drift WHERE position_id = ?1 "
      "ORDER BY frame");
  st.bind(1, position);
  while (st.step())
    out.push_back({st.integer(0), st.integer(1), st.real(2), st.real(3), st.real(4), st.real(5)});
  return out;
}

std::int64_t Project::addEngineRun(const EngineRun& run, const std::vector<Event>& proposals,
                                   const RunRecording& recording) {
  requireWritable();
  std::vector<int> covered = recording.positions;
  std::set<int> known;
  for (const auto& p : positions()) known.insert(p.id);
  if (covered.empty()) covered.assign(known.begin(), known.end());
  for (int p : covered)
    if (!known.contains(p))
      throw StoreError(fmt::format("engine run covers position {}, which does not exist", p));
  std::sort(covered.begin(), covered.end());
  covered.erase(std::unique(covered.begin(), covered.end()), covered.end());
  for (const auto& e : proposals)
    if (!std::binary_search(covered.begin(), covered.end(), e.position))
      throw StoreError(
          fmt::format("engine run proposes an event for position {}, which the run does not cover",
                      e.position));
  Transaction tx(*db_);
  db_->prepare(
         "INSERT INTO engine_runs(started_utc, engine_version, parameters_json, input_digest) "
         "VALUES (?1, ?2, ?3, ?4)")
      .bind(1, run.startedUtc.empty() ? utcNowIso() : run.startedUtc)
      .bind(2, run.engineVersion)
      .bind(3, run.parametersJson)
      .bind(4, run.inputDigest)
      .run();
  const std::int64_t runId = db_->lastInsertId();
  auto ins = db_->prepare(
      "INSERT INTO proposals(run_id, position_id, trap_id, frame, kind, confidence) "
      "VALUES (?1,?2,?3,?4,?5,?6)");
  for (const auto& e : proposals)
    ins.bind(1, runId)
        .bind(2, e.position)
        .bind(3, e.trap)
        .bind(4, e.frame)
        .bind(5, toString(e.kind))
        .bind(6, e.confidence)
        .run();
  journalEngineRun(*db_, runId, covered, recording.by, recording.reason);
  tx.commit();
  return runId;
}

namespace {
constexpr const char* kSelectRuns =
    "SELECT id, started_utc, engine_version, parameters_json, input_digest FROM engine_runs ";
EngineRun runFromRow(Statement& st) {
  return {st.int64(0), st.text(1), st.text(2), st.text(3), st.text(4)};
}
}  // namespace

std::optional<EngineRun> Project::latestRun() {
  auto st = db_->prepare(std::string(kSelectRuns) + "ORDER BY id DESC LIMIT 1");
  if (!st.step()) return std::nullopt;
  return runFromRow(st);
}

std::vector<EngineRun> Project::runs() {
  auto st = db_->prepare(std::string(kSelectRuns) + "ORDER BY id");
  std::vector<EngineRun> out;
  while (st.step()) out.push_back(runFromRow(st));
  return out;
}

void Project::addMeasurements(std::int64_t run, const std::vector<MeasurementRecord>& rows) {
  requireWritable();
  Transaction tx(*db_);
  auto ins = db_->prepare(
      "INSERT OR REPLACE INTO measurements(run_id, position_id, trap_id, frame, occupancy, "
      "p_empty, "
      "p_single, p_budded, p_crowded, cell_count, features_json) "
      "VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11)");
  for (const auto& m : rows)
    ins.bind(1, run)
        .bind(2, m.position)
        .bind(3, m.trap)
        .bind(4, m.frame)
        .bind(5, toString(m.occupancy))
        .bind(6, m.pEmpty)
        .bind(7, m.pSingle)
        .bind(8, m.pBudded)
        .bind(9, m.pCrowded)
        .bind(10, m.cellCount)
        .bind(11, m.featuresJson)
        .run();
  tx.commit();
}

std::vector<MeasurementRecord> Project::measurements(std::int64_t run, int position, int trap) {
  std::vector<MeasurementRecord> out;
  auto st = db_->prepare(
      "SELECT position_id, trap_id, frame, occupancy, p_empty, p_single, p_budded, p_crowded, "
      "cell_count, features_json FROM measurements WHERE run_id = ?1 AND position_id = ?2 AND "
      "trap_id = ?3 ORDER BY frame");
  st.bind(1, run).bind(2, position).bind(3, trap);
  while (st.step()) {
    MeasurementRecord m;
    m.position = st.integer(0);
    m.trap = st.integer(1);
    m.frame = st.integer(2);
    m.occupancy = occupancyFromString(st.text(3)).value_or(Occupancy::Empty);
    m.pEmpty = st.real(4);
    m.pSingle = st.real(5);
    m.pBudded = st.real(6);
    m.pCrowded = st.real(7);
    m.cellCount = st.integer(8);
    m.featuresJson = st.text(9);
    out.push_back(std::move(m));
  }
  return out;
}

std::vector<Event> Project::proposals(std::optional<std::int64_t> run) {
  if (!run) {
    auto latest = latestRun();
    if (!latest) return {};
    run = latest->id;
  }
  std::vector<Event> out;
  auto st = db_->prepare(
      "SELECT id, position_id, trap_id, frame, kind, confidence FROM proposals WHERE run_id = ?1 "
      "ORDER BY position_id, trap_id, frame, id");
  st.bind(1, *run);
  while (st.step()) {
    Event e;
    e.id = st.int64(0);
    e.position = st.integer(1);
    e.trap = st.integer(2);
    e.frame = st.integer(3);
    e.kind = eventKindFromString(st.text(4)).value_or(EventKind::Bud);
    e.confidence = st.real(5);
    out.push_back(e);
  }
  return out;
}

std::string utcNowIso() {
  using namespace std::chrono;
  const auto now = system_clock::now();
  const auto ms = duration_cast<milliseconds>(now.time_since_epoch()).count() % 1000;
  const std::time_t t = system_clock::to_time_t(now);
  std::tm tm{};
  gmtime_r(&t, &tm);
  return fmt::format("{:04}-{:02}-{:02}T{:02}:{:02}:{:02}.{:03}Z", tm.tm_year + 1900, tm.tm_mon + 1,
                     tm.tm_mday, tm.tm_hour, tm.tm_min, tm.tm_sec, ms);
}

}  // namespace budledger::store
