#include "core/store/journal.h"

#include <fmt/format.h>

#include <array>
#include <charconv>

#include "core/base/sha256.h"
#include "core/store/project.h"

namespace budledger::store {
namespace {

constexpr std::array<std::string_view, 11> kActions{"accept",      "move",   "delete",    "add",
                                                    "set-outcome", "note",   "undo",      "redo",
                                                    "sign-off",    "revoke", "engine-run"};

template <typename T>
std::optional<T> number(std::string_view s) {
  T v{};
  const auto* end = s.data() + s.size();
  auto [p, ec] = std::from_chars(s.data(), end, v);
  if (s.empty() || ec != std::errc() || p != end) return std::nullopt;
  return v;
}

// Splits "a/b/c" into exactly n integers.
template <std::size_t N>
std::optional<std::array<int, N>> ints(std::string_view s) {
  std::array<int, N> out{};
  for (std::size_t i = 0; i < N; ++i) {
    const auto slash = i + 1 < N ? s.find('/') : s.size();
    if (slash == std::string_view::npos) return std::nullopt;
    auto v = number<int>(s.substr(0, slash));
    if (!v) return std::nullopt;
    out[i] = *v;
    s = slash < s.size() ? s.substr(slash + 1) : std::string_view{};
  }
  return out;
}

void field(std::string& out, std::string_view name, std::string_view value) {
  out += name;
  out += '=';
  out += std::to_string(value.size());
  out += ':';
  out += value;
  out += '\n';
}

}  // namespace

std::string_view toString(JournalAction a) { return kActions[static_cast<std::size_t>(a)]; }

std::optional<JournalAction> journalActionFromString(std::string_view t) {
  for (std::size_t i = 0; i < kActions.size(); ++i)
    if (kActions[i] == t) return static_cast<JournalAction>(i);
  return std::nullopt;
}

bool isUndoableEdit(JournalAction a) {
  switch (a) {
    case JournalAction::Accept:
    case JournalAction::Move:
    case JournalAction::Delete:
    case JournalAction::Add:
    case JournalAction::SetOutcome:
      return true;
    default:
      return false;
  }
}

std::string toString(const Target& t) {
  switch (t.kind) {
    case Target::Kind::Event:
      return fmt::format("event:{}", t.id);
    case Target::Kind::Tenure:
      return fmt::format("tenure:{}/{}/{}", t.position, t.trap, t.mother);
    case Target::Kind::Trap:
      return fmt::format("trap:{}/{}", t.position, t.trap);
    case Target::Kind::Position:
      return fmt::format("position:{}", t.position);
    case Target::Kind::Experiment:
      return "experiment";
    case Target::Kind::Entry:
      return fmt::format("entry:{}", t.id);
    case Target::Kind::SignOff:
      return fmt::format("signoff:{}", t.id);
    case Target::Kind::Run:
      return fmt::format("run:{}", t.id);
  }
  return "?";
}

std::optional<Target> parseTarget(std::string_view t) {
  if (t == "experiment") return Target::experiment();
  const auto colon = t.find(':');
  if (colon == std::string_view::npos) return std::nullopt;
  const auto kind = t.substr(0, colon);
  const auto rest = t.substr(colon + 1);
  auto id = [&]() { return number<std::int64_t>(rest); };
  if (kind == "event") {
    if (auto v = id()) return Target::event(*v);
  } else if (kind == "entry") {
    if (auto v = id()) return Target::entry(*v);
  } else if (kind == "signoff") {
    if (auto v = id()) return Target::signOff(*v);
  } else if (kind == "run") {
    if (auto v = id()) return Target::run(*v);
  } else if (kind == "position") {
    if (auto v = ints<1>(rest)) return Target::positionOf((*v)[0]);
  } else if (kind == "trap") {
    if (auto v = ints<2>(rest)) return Target::trapOf((*v)[0], (*v)[1]);
  } else if (kind == "tenure") {
    if (auto v = ints<3>(rest)) return Target::tenure((*v)[0], (*v)[1], (*v)[2]);
  }
  return std::nullopt;
}

std::string canonicalText(const JournalEntry& e) {
  std::string out = "budledger-journal-entry/1\n";
  out.reserve(256 + e.before.size() + e.after.size() + e.reason.size());
  field(out, "seq", std::to_string(e.seq));
  field(out, "utc", e.utc);
  field(out, "actor", e.actor);
  field(out, "role", e.role);
  field(out, "action", toString(e.action));
  field(out, "target", e.target);
  field(out, "before", e.before);
  field(out, "after", e.after);
  field(out, "reason", e.reason);
  field(out, "origin", e.origin);
  field(out, "prev_hash", e.prevHash);
  return out;
}

std::string entryHash(const JournalEntry& e) { return sha256Hex(canonicalText(e)); }

JournalWriter::JournalWriter(Database& db)
    : db_(db),
      head_(db.prepare("SELECT seq, hash FROM journal ORDER BY seq DESC LIMIT 1")),
      insert_(db.prepare(
          "INSERT INTO journal(seq, utc, actor, role, action, target, value_before, value_after, "
          "reason, origin, prev_hash, hash) VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11,?12)")),
      meta_(db.prepare("INSERT INTO meta(key, value) VALUES ('journal_head', ?1) "
                       "ON CONFLICT(key) DO UPDATE SET value = excluded.value")) {}

std::int64_t JournalWriter::nextSeq() {
  std::int64_t seq = 1;
  if (head_.step()) seq = head_.int64(0) + 1;
  head_.reset();
  return seq;
}

void JournalWriter::append(JournalEntry& e) {
  e.seq = 1;
  e.prevHash = kGenesisHash;
  if (head_.step()) {
    e.seq = head_.int64(0) + 1;
    e.prevHash = head_.text(1);
  }
  head_.reset();
  if (e.utc.empty()) e.utc = utcNowIso();
  e.hash = entryHash(e);
  insert_.bind(1, e.seq)
      .bind(2, e.utc)
      .bind(3, e.actor)
      .bind(4, e.role)
      .bind(5, toString(e.action))
      .bind(6, e.target)
      .bind(7, e.before)
      .bind(8, e.after)
      .bind(9, e.reason)
      .bind(10, e.origin)
      .bind(11, e.prevHash)
      .bind(12, e.hash)
      .run();
  meta_.bind(1, fmt::format("{}:{}", e.seq, e.hash)).run();
}

JournalHead journalHead(Database& db) {
  auto st = db.prepare("SELECT seq, hash FROM journal ORDER BY seq DESC LIMIT 1");
  if (!st.step()) return {};
  return {st.int64(0), st.text(1)};
}

namespace {
JournalEntry rowToEntry(const Statement& st) {
  JournalEntry e;
  e.seq = st.int64(0);
  e.utc = st.text(1);
  e.actor = st.text(2);
  e.role = st.text(3);
  const auto action = st.text(4);
  if (auto a = journalActionFromString(action))
    e.action = *a;
  else
    e.unknownAction = action;
  e.target = st.text(5);
  e.before = st.text(6);
  e.after = st.text(7);
  e.reason = st.text(8);
  e.origin = st.text(9);
  e.prevHash = st.text(10);
  e.hash = st.text(11);
  return e;
}
constexpr std::string_view kSelect =
    "SELECT seq, utc, actor, role, action, target, value_before, value_after, reason, origin, "
    "prev_hash, hash FROM journal ";
}  // namespace

std::vector<JournalEntry> readJournal(Database& db, std::int64_t fromSeq) {
  std::vector<JournalEntry> out;
  auto st = db.prepare(std::string(kSelect) + "WHERE seq >= ?1 ORDER BY seq");
  st.bind(1, fromSeq);
  while (st.step()) out.push_back(rowToEntry(st));
  return out;
}

std::optional<JournalEntry> readEntry(Database& db, std::int64_t seq) {
  auto st = db.prepare(std::string(kSelect) + "WHERE seq = ?1");
  st.bind(1, seq);
  if (!st.step()) return std::nullopt;
  return rowToEntry(st);
}

}  // namespace budledger::store
