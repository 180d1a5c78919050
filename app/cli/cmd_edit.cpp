// budledger-cli edit P.budledger accept|move|delete|add|outcome|note …
// budledger-cli edit P.budledger --batch edits.csv
// One edit per call, or many from a CSV file — each its own transaction,
// journaled with who, role and reason; a batch stops at the first row it
// cannot apply, naming the row and the column.
#include <fmt/format.h>

#include <charconv>
#include <fstream>
#include <map>
#include <memory>
#include <optional>
#include <string>

#include "app/cli/actor_options.h"
#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "app/cli/csv_reader.h"
#include "core/store/editor.h"

namespace budledger::cli {
namespace {

// One edit as the command line or a batch row states it.
struct EditRequest {
  std::string action;  // accept, move, delete, add, outcome, note
  std::optional<std::int64_t> event;
  std::optional<std::string> position;
  std::optional<int> trap;
  std::optional<int> frame;
  std::optional<std::string> kind;
  std::optional<int> mother;
  std::optional<std::string> outcome;
  std::optional<std::string> text;
  std::string reason;
};

struct EditArgs {
  std::string project;
  ActorOptions actor;
  std::string batch;
  EditRequest request;
};

// A problem with one request: which field, what is wrong.
struct FieldError {
  std::string column;
  std::string what;
};

template <typename T>
const T& need(const std::optional<T>& v, const char* column) {
  if (!v) throw FieldError{column, "is required for this action"};
  return *v;
}

store::Change apply(store::Project& project, store::Editor& ed, const store::Actor& by,
                    const EditRequest& r) {
  const auto& a = r.action;
  if (a == "accept") return ed.accept(by, need(r.event, "event"), r.reason);
  if (a == "delete") return ed.reject(by, need(r.event, "event"), r.reason);
  if (a == "move") return ed.move(by, need(r.event, "event"), need(r.frame, "frame"), r.reason);
  if (a == "add") {
    const auto kind = eventKindFromString(need(r.kind, "kind"));
    if (!kind)
      throw FieldError{"kind", fmt::format("'{}' is not bud, separation, death, washout "
                                           "or arrival",
                                           *r.kind)};
    return ed.add(by, {positionId(project, need(r.position, "position")), need(r.trap, "trap")},
                  need(r.frame, "frame"), *kind, r.reason);
  }
  if (a == "outcome") {
    const auto outcome = outcomeFromString(need(r.outcome, "outcome"));
    if (!outcome)
      throw FieldError{"outcome",
                       fmt::format("'{}' is not death, washout or end-of-imaging", *r.outcome)};
    return ed.setOutcome(by,
                         {positionId(project, need(r.position, "position")), need(r.trap, "trap"),
                          need(r.mother, "mother")},
                         *outcome, r.reason);
  }
  if (a == "note") {
    store::Target t = store::Target::experiment();
    if (r.event)
      t = store::Target::event(*r.event);
    else if (r.position) {
      const int p = positionId(project, *r.position);
      t = !r.trap    ? store::Target::positionOf(p)
          : r.mother ? store::Target::tenure(p, *r.trap, *r.mother)
                     : store::Target::trapOf(p, *r.trap);
    }
    return ed.note(by, t, need(r.text, "text"), r.reason);
  }
  throw FieldError{"action",
                   fmt::format("'{}' is not accept, move, delete, add, outcome or note", a)};
}

template <typename T>
std::optional<T> number(const std::string& s, const char* column) {
  if (s.empty()) return std::nullopt;
  T v{};
  const auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  if (ec != std::errc() || p != s.data() + s.size())
    throw FieldError{column, fmt::format("'{}' is not a whole number", s)};
  return v;
}

std::optional<std::string> text(const std::string& s) {
  return s.empty() ? std::nullopt : std::optional(s);
}

int runBatch(const EditArgs& args) {
  std::ifstream in(args.batch, std::ios::binary);
  if (!in) throw std::runtime_error(fmt::format("{}: cannot be read", args.batch));
  const auto records = readCsv(in, args.batch);
  if (records.empty()) throw std::runtime_error(fmt::format("{}: is empty", args.batch));
  static const std::vector<std::string> kColumns{"action", "event",  "position", "trap", "frame",
                                                 "kind",   "mother", "outcome",  "text", "reason"};
  std::map<std::string, std::size_t> column;
  for (std::size_t i = 0; i < records[0].fields.size(); ++i) {
    const auto& name = records[0].fields[i];
    if (std::find(kColumns.begin(), kColumns.end(), name) == kColumns.end())
      throw std::runtime_error(fmt::format(
          "{}: row 1, column {}: unknown column '{}' (columns: action,event,position,trap,frame,"
          "kind,mother,outcome,text,reason)",
          args.batch, i + 1, name));
    column[name] = i;
  }
  if (!column.contains("action"))
    throw std::runtime_error(
        fmt::format("{}: row 1: the header has no 'action' column", args.batch));

  auto project = store::Project::open(args.project);
  store::Editor ed(project);
  const auto by = resolveActor(args.actor);
  int applied = 0;
  int unchanged = 0;
  for (std::size_t r = 1; r < records.size(); ++r) {
    const auto& rec = records[r];
    auto get = [&](const char* name) -> std::string {
      const auto it = column.find(name);
      return it == column.end() || it->second >= rec.fields.size() ? "" : rec.fields[it->second];
    };
    auto stop = [&](const std::string& where, const std::string& what) {
      return std::runtime_error(fmt::format("{}: row {}{}: {} ({} edit{} before it applied)",
                                            args.batch, rec.line, where, what, applied,
                                            applied == 1 ? "" : "s"));
    };
    try {
      if (rec.fields.size() > records[0].fields.size())
        throw FieldError{"", fmt::format("has {} fields, the header {}", rec.fields.size(),
                                         records[0].fields.size())};
      EditRequest q;
      q.action = get("action");
      q.event = number<std::int64_t>(get("event"), "event");
      q.position = text(get("position"));
      q.trap = number<int>(get("trap"), "trap");
      q.frame = number<int>(get("frame"), "frame");
      q.kind = text(get("kind"));
      q.mother = number<int>(get("mother"), "mother");
      q.outcome = text(get("outcome"));
      q.text = text(get("text"));
      q.reason = get("reason").empty() ? args.actor.reason : get("reason");
      const auto c = apply(project, ed, by, q);
      (c.recorded() ? applied : unchanged) += 1;
    } catch (const FieldError& e) {
      throw stop(e.column.empty() ? "" : fmt::format(", column '{}'", e.column), e.what);
    } catch (const store::EditRefused& e) {
      throw stop("", e.what());
    } catch (const std::runtime_error& e) {
      throw stop("", e.what());
    }
  }
  fmt::print("applied {} edit{} from {} ({} changed nothing)\n", applied, applied == 1 ? "" : "s",
             args.batch, unchanged);
  return 0;
}

int runOne(EditArgs& args) {
  auto project = store::Project::open(args.project);
  store::Editor ed(project);
  args.request.reason = args.actor.reason;
  try {
    const auto c = apply(project, ed, resolveActor(args.actor), args.request);
    if (c.recorded())
      fmt::print("entry {}: {}\n", c.seq, c.summary);
    else
      fmt::print("nothing changed: it is so already; nothing recorded\n");
    return 0;
  } catch (const FieldError& e) {
    throw std::runtime_error(fmt::format("--{} {}", e.column, e.what));
  }
}

}  // namespace

void addEditCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand("edit",
                                  "Accept, move, delete or add events, set outcomes, "
                                  "note — each journaled");
  auto args = std::make_shared<EditArgs>();
  sub->add_option("project", args->project, "Project file (.budledger)")->required();
  addActorOptions(sub, args->actor, "technician");
  auto* batch = sub->add_option("--batch", args->batch,
                                "CSV of edits (columns action,event,position,trap,frame,kind,"
                                "mother,outcome,text,reason), one transaction each");
  auto& r = args->request;
  auto verb = [&](const char* name, const char* help) {
    auto* v = sub->add_subcommand(name, help);
    v->fallthrough();
    v->callback([args, name] { args->request.action = name; });
    return v;
  };
  auto* acc = verb("accept", "Confirm an event as proposed");
  acc->add_option("--event", r.event, "Event id")->required();
  auto* mv = verb("move", "Move an event to another frame");
  mv->add_option("--event", r.event, "Event id")->required();
  mv->add_option("--frame", r.frame, "New frame")->required();
  auto* del = verb("delete", "Delete (reject) an event; it stays in the journal");
  del->add_option("--event", r.event, "Event id")->required();
  auto* add = verb("add", "Add an event the engine missed");
  add->add_option("--position", r.position, "Position name")->required();
  add->add_option("--trap", r.trap, "Trap id")->required();
  add->add_option("--frame", r.frame, "Frame")->required();
  add->add_option("--kind", r.kind, "bud, separation, death, washout or arrival")->required();
  auto* out = verb("outcome", "Set how a mother's tenure ended");
  out->add_option("--position", r.position, "Position name")->required();
  out->add_option("--trap", r.trap, "Trap id")->required();
  out->add_option("--mother", r.mother, "Mother (0, 1 … within the trap)")->required();
  out->add_option("--outcome", r.outcome, "death, washout or end-of-imaging")->required();
  auto* note = verb("note", "Add a note to an event, tenure, trap, position or the experiment");
  note->add_option("--text", r.text, "The note")->required();
  note->add_option("--event", r.event, "Event id");
  note->add_option("--position", r.position, "Position name");
  note->add_option("--trap", r.trap, "Trap id (with --position)");
  note->add_option("--mother", r.mother, "Mother (with --trap)");
  sub->require_subcommand(0, 1);
  sub->callback([&action, args, sub, batch] {
    const bool one = !sub->get_subcommands().empty();
    if (one == (batch->count() > 0))
      throw CLI::ValidationError("edit",
                                 "give one edit (accept, move, delete, add, outcome, note) "
                                 "or --batch FILE");
    action = [args, one] { return one ? runOne(*args) : runBatch(*args); };
  });
}

}  // namespace budledger::cli
