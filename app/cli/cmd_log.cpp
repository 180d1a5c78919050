// budledger-cli log P.budledger [--format text|csv|json] — the audit trail:
// every journal entry with who, when (UTC), what, the value before and
// after, and why. text is for reading (positions by name); csv and json give
// every column as stored, hashes included, for archiving and other tools.
#include <fmt/format.h>

#include <map>
#include <memory>
#include <nlohmann/json.hpp>
#include <string>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/store/current_event.h"
#include "core/store/engine_run_entry.h"
#include "core/store/journal.h"
#include "core/store/project.h"
#include "core/store/signoff.h"

namespace budledger::cli {
namespace {

using Names = std::map<int, std::string>;

std::string name(const Names& names, int id) {
  const auto it = names.find(id);
  return it == names.end() ? fmt::format("position {}", id) : it->second;
}

std::string eventChange(const Names& names, const std::string& before, const std::string& after) {
  const auto b = store::parseEventState(before);
  const auto a = store::parseEventState(after);
  const auto& s = a ? *a : *b;
  const auto what =
      fmt::format("{} in {} trap {}", toString(s.kind), name(names, s.position), s.trap);
  auto at = [](const std::optional<store::EventState>& x) {
    return x ? fmt::format("frame {} {}", x->frame, toString(x->status)) : std::string("none");
  };
  return fmt::format("{}: {} → {}", what, at(b), at(a));
}

std::string change(const store::JournalEntry& e, const Names& names) {
  using store::JournalAction;
  try {
    switch (e.action) {
      case JournalAction::Accept:
      case JournalAction::Move:
      case JournalAction::Delete:
      case JournalAction::Add:
        return eventChange(names, e.before, e.after);
      case JournalAction::Undo:
      case JournalAction::Redo:
      case JournalAction::SetOutcome:
        if (e.after.find("\"override\"") != std::string::npos) {
          const auto b = nlohmann::json::parse(e.before);
          const auto a = nlohmann::json::parse(e.after);
          return fmt::format("outcome {} → {}", b.at("outcome").get<std::string>(),
                             a.at("outcome").get<std::string>());
        }
        return eventChange(names, e.before, e.after);
      case JournalAction::Note:
        return nlohmann::json::parse(e.after).at("text").get<std::string>();
      case JournalAction::SignOff: {
        const auto v = store::parseSignOffJson(e.after);
        return fmt::format("{} {} (lifespans digest {})", toString(v.meaning), v.scopeName,
                           v.digest.substr(0, 16));
      }
      case JournalAction::Revoke:
        return "sign-off withdrawn";
      case JournalAction::EngineRun: {
        const auto v = store::parseEngineRunJson(e.after);
        std::string where;
        for (int p : v.positions) where += (where.empty() ? "" : ", ") + name(names, p);
        return fmt::format("run {}: {} proposals for {}; {} decisions carried over, {} for review",
                           v.run, v.proposals, where, v.carry.carried.size(),
                           v.carry.unmatched.size());
      }
    }
  } catch (const std::exception&) {
  }
  return fmt::format("{} → {}", e.before, e.after);
}

std::string csvField(const std::string& s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
  std::string out = "\"";
  for (char c : s) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + '"';
}

nlohmann::json valueJson(const std::string& text) {
  try {
    return nlohmann::json::parse(text);
  } catch (const nlohmann::json::exception&) {
    return text;  // not JSON: show it as it is stored
  }
}

int run(const std::string& path, const std::string& format) {
  auto project = store::Project::open(path, store::Database::Access::ReadOnly);
  Names names;
  for (const auto& p : project.positions()) names[p.id] = p.name;
  const auto entries = store::readJournal(project.db());
  if (format == "json") {
    auto all = nlohmann::json::array();
    for (const auto& e : entries)
      all.push_back({{"seq", e.seq},
                     {"utc", e.utc},
                     {"actor", e.actor},
                     {"role", e.role},
                     {"action", std::string(toString(e.action))},
                     {"target", e.target},
                     {"value_before", valueJson(e.before)},
                     {"value_after", valueJson(e.after)},
                     {"reason", e.reason},
                     {"origin", e.origin},
                     {"prev_hash", e.prevHash},
                     {"hash", e.hash}});
    fmt::print("{}\n", all.dump(2));
    return 0;
  }
  if (format == "csv") {
    fmt::print(
        "seq,utc,actor,role,action,target,value_before,value_after,reason,origin,"
        "prev_hash,hash\n");
    for (const auto& e : entries)
      fmt::print("{},{},{},{},{},{},{},{},{},{},{},{}\n", e.seq, e.utc, csvField(e.actor),
                 csvField(e.role), toString(e.action), csvField(e.target), csvField(e.before),
                 csvField(e.after), csvField(e.reason), csvField(e.origin), e.prevHash, e.hash);
    return 0;
  }
  for (const auto& e : entries) {
    fmt::print("{:>5}  {}  {} ({})  {:<11} {:<16} {}", e.seq, e.utc, e.actor, e.role,
               toString(e.action), e.target, change(e, names));
    if (!e.reason.empty()) fmt::print("  — {}", e.reason);
    if (!e.origin.empty()) fmt::print("  [from {}]", e.origin.substr(0, e.origin.find(':')));
    fmt::print("\n");
  }
  if (entries.empty()) fmt::print("the journal is empty\n");
  return 0;
}

}  // namespace

void addLogCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand("log", "Print the audit trail (every journal entry)");
  auto path = std::make_shared<std::string>();
  auto format = std::make_shared<std::string>("text");
  sub->add_option("project", *path, "Project file (.budledger)")->required();
  sub->add_option("--format", *format, "text, csv or json")
      ->check(CLI::IsMember({"text", "csv", "json"}))
      ->capture_default_str();
  sub->callback(
      [&action, path, format] { action = [path, format] { return run(*path, *format); }; });
}

}  // namespace budledger::cli
