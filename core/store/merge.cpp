#include "core/store/merge.h"

#include <fmt/format.h>
#include <unistd.h>

#include <filesystem>
#include <map>
#include <nlohmann/json.hpp>

#include "core/store/engine_run_entry.h"
#include "core/store/materialised.h"
#include "core/store/project.h"
#include "core/store/signoff.h"
#include "core/store/verify.h"

namespace budledger::store {
namespace {

std::string base(const std::string& path) { return std::filesystem::path(path).filename(); }

// Old → new ids of one source.
struct Ids {
  std::map<int, int> positions;
  std::map<std::int64_t, std::int64_t> runs;
  std::map<std::int64_t, std::int64_t> proposals;
  std::int64_t seqBase = 0;  // new seq = seqBase + old seq

  int position(int old) const {
    const auto it = positions.find(old);
    if (it == positions.end()) throw StoreError(fmt::format("unknown position id {}", old));
    return it->second;
  }
  std::int64_t event(std::int64_t old) const {
    if (old < 0) return -(seqBase - old);  // an added event: minus its entry's seq
    const auto it = proposals.find(old);
    if (it == proposals.end()) throw StoreError(fmt::format("unknown proposal id {}", old));
    return it->second;
  }
};

std::string remapTarget(const std::string& text, const Ids& ids) {
  const auto t = parseTarget(text);
  if (!t) throw StoreError(fmt::format("entry target '{}' is not valid", text));
  Target n = *t;
  switch (t->kind) {
    case Target::Kind::Event:
      n.id = ids.event(t->id);
      break;
    case Target::Kind::Entry:
    case Target::Kind::SignOff:
      n.id = ids.seqBase + t->id;
      break;
    case Target::Kind::Run:
      n.id = ids.runs.at(t->id);
      break;
    case Target::Kind::Tenure:
    case Target::Kind::Trap:
    case Target::Kind::Position:
      n.position = ids.position(t->position);
      break;
    case Target::Kind::Experiment:
      break;
  }
  return toString(n);
}

std::string remapEventState(const std::string& json, const Ids& ids) {
  auto s = parseEventState(json);
  if (!s) return json;
  s->position = ids.position(s->position);
  return stateJson(s);
}

JournalEntry remapEntry(const JournalEntry& e, const Ids& ids, const std::string& file) {
  JournalEntry n = e;
  n.origin = e.origin.empty() ? fmt::format("{}#{}:{}", file, e.seq, e.hash) : e.origin;
  n.target = remapTarget(e.target, ids);
  switch (e.action) {
    case JournalAction::Accept:
    case JournalAction::Move:
    case JournalAction::Delete:
    case JournalAction::Add:
      n.before = remapEventState(e.before, ids);
      n.after = remapEventState(e.after, ids);
      break;
    case JournalAction::Undo:
    case JournalAction::Redo:
      if (e.before.find("\"status\"") != std::string::npos ||
          e.after.find("\"status\"") != std::string::npos) {
        n.before = remapEventState(e.before, ids);
        n.after = remapEventState(e.after, ids);
      }
      break;
    case JournalAction::EngineRun: {
      auto v = parseEngineRunJson(e.after);
      v.run = ids.runs.at(v.run);
      for (auto& p : v.positions) p = ids.position(p);
      for (auto& [o, nw] : v.carry.carried) {
        o = ids.event(o);
        nw = ids.event(nw);
      }
      for (auto& u : v.carry.unmatched) u = ids.event(u);
      std::sort(v.positions.begin(), v.positions.end());
      std::sort(v.carry.carried.begin(), v.carry.carried.end());
      std::sort(v.carry.unmatched.begin(), v.carry.unmatched.end());
      n.after = engineRunJson(v);
      break;
    }
    default:
      break;  // notes, set-outcome, sign-off and revoke values hold no ids
  }
  return n;
}

struct Source {
  std::string path;
  std::string file;
  std::unique_ptr<Project> project;
};

void checkConflicts(std::vector<Source>& sources) {
  std::map<std::string, std::pair<std::string, std::string>> positionAt;  // name → file, digest
  std::map<std::string, std::pair<std::string, std::string>> inputAt;     // sha → file, name
  std::map<std::string, std::pair<std::string, std::string>> metaAt;      // key → file, value
  for (auto& s : sources) {
    auto& p = *s.project;
    const auto report = verifyProject(p);
    if (!report.ok())
      throw StoreError(
          fmt::format("{} does not verify ({}); merge refused", s.path, report.problems.front()));
    for (const auto& so : signOffs(p.db()))
      if (so.active() && so.scope.kind == Scope::Kind::Experiment)
        throw StoreError(fmt::format(
            "{} is signed off experiment-wide (sign-off {} by {}); a merged experiment needs its "
            "own sign-off: revoke it there first",
            s.path, so.id, so.person));
    for (const char* key : {kMetaIntervalMin, kMetaPixelUm}) {
      const auto v = p.meta(key);
      if (!v) continue;
      const auto it = metaAt.find(key);
      if (it != metaAt.end() && it->second.second != *v)
        throw StoreError(fmt::format("{} has {} {} but {} has {}; merge refused", it->second.first,
                                     key, it->second.second, s.path, *v));
      metaAt.emplace(key, std::pair(s.path, *v));
    }
    const auto inputs = p.inputs();
    for (const auto& pos : p.positions()) {
      std::string digest;
      for (const auto& in : inputs)
        if (in.position == pos.id) {
          digest += in.sha256;
          const auto it = inputAt.find(in.sha256);
          if (it != inputAt.end() && it->second.second != pos.name)
            throw StoreError(fmt::format(
                "the same input ({}, sha256 {}) is position '{}' in {} and '{}' in {}; merge "
                "refused",
                in.path, in.sha256.substr(0, 12), it->second.second, it->second.first, pos.name,
                s.path));
          inputAt.emplace(in.sha256, std::pair(s.path, pos.name));
        }
      const auto it = positionAt.find(pos.name);
      if (it != positionAt.end()) {
        if (it->second.second != digest)
          throw StoreError(fmt::format(
              "position '{}' is in {} and {} with different input digests ({} vs {}); merge "
              "refused",
              pos.name, it->second.first, s.path,
              it->second.second.empty() ? "none" : it->second.second.substr(0, 12),
              digest.empty() ? "none" : digest.substr(0, 12)));
        throw StoreError(fmt::format(
            "position '{}' is in both {} and {} (same inputs); merge each position once", pos.name,
            it->second.first, s.path));
      }
      positionAt.emplace(pos.name, std::pair(s.path, digest));
    }
  }
}

void copySource(Source& s, Project& out, JournalWriter& writer, Ids& ids) {
  auto& from = s.project->db();
  auto& to = out.db();
  for (const auto& p : s.project->positions()) ids.positions[p.id] = out.addPosition(p);
  for (auto in : s.project->inputs()) {
    in.position = ids.position(in.position);
    out.addInput(in);
  }
  auto traps = from.prepare("SELECT position_id, trap_id, row, col, x, y, edge FROM traps");
  auto insTrap = to.prepare(
      "INSERT INTO traps(position_id, trap_id, row, col, x, y, edge) VALUES "
      "(?1,?2,?3,?4,?5,?6,?7)");
  while (traps.step())
    insTrap.bind(1, ids.position(traps.integer(0)))
        .bind(2, traps.integer(1))
        .bind(3, traps.integer(2))
        .bind(4, traps.integer(3))
        .bind(5, traps.real(4))
        .bind(6, traps.real(5))
        .bind(7, traps.integer(6))
        .run();
  auto drift = from.prepare("SELECT position_id, frame, dx, dy, confidence, focus FROM drift");
  auto insDrift = to.prepare(
      "INSERT INTO drift(position_id, frame, dx, dy, confidence, focus) VALUES "
      "(?1,?2,?3,?4,?5,?6)");
  while (drift.step())
    insDrift.bind(1, ids.position(drift.integer(0)))
        .bind(2, drift.integer(1))
        .bind(3, drift.real(2))
        .bind(4, drift.real(3))
        .bind(5, drift.real(4))
        .bind(6, drift.real(5))
        .run();
  auto runs = from.prepare(
      "SELECT id, started_utc, engine_version, parameters_json, input_digest FROM engine_runs "
      "ORDER BY id");
  auto insRun = to.prepare(
      "INSERT INTO engine_runs(started_utc, engine_version, parameters_json, input_digest) "
      "VALUES (?1,?2,?3,?4)");
  while (runs.step()) {
    insRun.bind(1, runs.text(1)).bind(2, runs.text(2)).bind(3, runs.text(3)).bind(4, runs.text(4));
    insRun.run();
    ids.runs[runs.int64(0)] = to.lastInsertId();
  }
  auto props = from.prepare(
      "SELECT id, run_id, position_id, trap_id, frame, kind, confidence FROM proposals ORDER BY "
      "id");
  auto insProp = to.prepare(
      "INSERT INTO proposals(run_id, position_id, trap_id, frame, kind, confidence) "
      "VALUES (?1,?2,?3,?4,?5,?6)");
  while (props.step()) {
    insProp.bind(1, ids.runs.at(props.int64(1)))
        .bind(2, ids.position(props.integer(2)))
        .bind(3, props.integer(3))
        .bind(4, props.integer(4))
        .bind(5, props.text(5))
        .bind(6, props.real(6))
        .run();
    ids.proposals[props.int64(0)] = to.lastInsertId();
  }
  auto meas = from.prepare(
      "SELECT run_id, position_id, trap_id, frame, occupancy, p_empty, p_single, p_budded, "
      "p_crowded, cell_count, features_json FROM measurements");
  auto insMeas = to.prepare(
      "INSERT INTO measurements(run_id, position_id, trap_id, frame, occupancy, p_empty, "
      "p_single, p_budded, p_crowded, cell_count, features_json) "
      "VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11)");
  while (meas.step())
    insMeas.bind(1, ids.runs.at(meas.int64(0)))
        .bind(2, ids.position(meas.integer(1)))
        .bind(3, meas.integer(2))
        .bind(4, meas.integer(3))
        .bind(5, meas.text(4))
        .bind(6, meas.real(5))
        .bind(7, meas.real(6))
        .bind(8, meas.real(7))
        .bind(9, meas.real(8))
        .bind(10, meas.integer(9))
        .bind(11, meas.text(10))
        .run();
  ids.seqBase = writer.nextSeq() - 1;
  for (const auto& e : readJournal(from)) {
    auto n = remapEntry(e, ids, s.file);
    writer.append(n);
    if (n.seq != ids.seqBase + e.seq)
      throw StoreError("merged journal lost its numbering");  // cannot happen: one writer
  }
}

}  // namespace

MergeSummary mergeProjects(const MergeRequest& req) {
  if (req.sources.size() < 2) throw StoreError("merge needs at least two projects");
  if (std::filesystem::exists(req.out))
    throw StoreError(fmt::format("'{}' already exists; refusing to overwrite it", req.out));
  std::vector<Source> sources;
  for (const auto& path : req.sources)
    sources.push_back({path, base(path),
                       std::make_unique<Project>(Project::open(path, Database::Access::ReadOnly))});
  checkConflicts(sources);

  const std::string tmp = fmt::format("{}.merging-{}", req.out, getpid());
  std::filesystem::remove(tmp);
  MergeSummary summary;
  try {
    {
      auto out = Project::create(tmp);
      Transaction tx(out.db());
      for (auto& s : sources) {
        auto st = s.project->db().prepare("SELECT key, value FROM meta");
        while (st.step()) {
          const auto key = st.text(0);
          if (key != "created_utc" && key != "journal_head" && !out.meta(key))
            out.setMeta(key, st.text(1));
        }
      }
      JournalWriter writer(out.db());
      std::string from;
      for (auto& s : sources) {
        Ids ids;
        copySource(s, out, writer, ids);
        const auto head = journalHead(s.project->db());
        from += fmt::format("{}{} ({} entr{}, head {})", from.empty() ? "" : ", ", s.file, head.seq,
                            head.seq == 1 ? "y" : "ies", head.hash);
      }
      out.setMeta("merged_from", from);
      JournalEntry note;
      note.actor = req.by.name;
      note.role = req.by.role;
      note.action = JournalAction::Note;
      note.target = toString(Target::experiment());
      nlohmann::json text;
      text["text"] = "merged from " + from;
      note.after = text.dump();
      note.reason = "merge";
      writer.append(note);
      summary.entries = note.seq;
      writeState(out.db(), [&] {
        const auto r = replay(readJournal(out.db()), loadReplaySources(out.db()));
        if (r.problem)
          throw StoreError(
              fmt::format("merged journal entry {}: {}", r.problem->seq, r.problem->what));
        return r.state;
      }());
      tx.commit();
      summary.positions = static_cast<int>(out.positions().size());
      const auto report = verifyProject(out);
      if (!report.ok())
        throw StoreError(
            fmt::format("the merged project does not verify: {}", report.problems.front()));
    }
    std::filesystem::rename(tmp, req.out);
  } catch (...) {
    std::error_code ec;
    std::filesystem::remove(tmp, ec);
    std::filesystem::remove(tmp + "-wal", ec);
    std::filesystem::remove(tmp + "-shm", ec);
    throw;
  }
  return summary;
}

}  // namespace budledger::store
