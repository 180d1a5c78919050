// budledger-cli signoff P.budledger --scope experiment|position:NAME|trap:NAME/T
//   --meaning reviewed|approved --as NAME --role ROLE [--reason TEXT]
// budledger-cli signoff P.budledger --revoke ID --reason TEXT --as NAME --role ROLE
// budledger-cli signoff P.budledger --list
// A sign-off binds the digest of the lifespans in its scope; edits inside it
// are refused until it is revoked, with a reason.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "app/cli/actor_options.h"
#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/store/editor.h"
#include "core/store/materialised.h"

namespace budledger::cli {
namespace {

struct SignOffArgs {
  std::string project;
  ActorOptions actor;
  std::string scope;
  std::string meaning;
  std::int64_t revoke = 0;
  bool list = false;
};

int list(store::Project& project) {
  const auto all = store::signOffs(project.db());
  for (const auto& so : all)
    fmt::print("{:>5}  {}  {} {} by {} ({})  digest {}{}\n", so.id, so.utc, toString(so.meaning),
               so.scopeName, so.person, so.role, so.digest.substr(0, 16),
               so.revokedSeq ? fmt::format("  revoked by entry {}", *so.revokedSeq) : "");
  if (all.empty()) fmt::print("no sign-offs\n");
  return 0;
}

int run(const SignOffArgs& a) {
  if (a.list) {
    auto project = store::Project::open(a.project, store::Database::Access::ReadOnly);
    return list(project);
  }
  auto project = store::Project::open(a.project);
  store::Editor ed(project);
  const auto by = resolveActor(a.actor);
  store::Change c;
  if (a.revoke) {
    c = ed.revoke(by, a.revoke, a.actor.reason);
  } else {
    const auto meaning = store::signMeaningFromString(a.meaning);
    if (!meaning) throw std::runtime_error("--meaning must be reviewed or approved");
    c = ed.signOff(by, parseScope(project, a.scope), *meaning, a.actor.reason);
  }
  if (c.recorded())
    fmt::print("entry {}: {}\n", c.seq, c.summary);
  else
    fmt::print("nothing changed: already signed so; nothing recorded\n");
  return 0;
}

}  // namespace

void addSignoffCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "signoff",
      "Sign off (or revoke a sign-off of) the lifespans of a trap, position or the "
      "experiment");
  auto a = std::make_shared<SignOffArgs>();
  sub->add_option("project", a->project, "Project file (.budledger)")->required();
  addActorOptions(sub, a->actor, "");
  auto* scope = sub->add_option("--scope", a->scope, "experiment, position:NAME or trap:NAME/TRAP");
  auto* meaning = sub->add_option("--meaning", a->meaning, "reviewed or approved")
                      ->check(CLI::IsMember({"reviewed", "approved"}));
  auto* revoke = sub->add_option("--revoke", a->revoke, "Revoke the sign-off with this id");
  auto* listFlag = sub->add_flag("--list", a->list, "List the sign-offs");
  scope->needs(meaning);
  meaning->needs(scope);
  revoke->excludes(scope);
  listFlag->excludes(scope)->excludes(revoke);
  sub->callback([&action, a, scope, revoke, listFlag] {
    if (!scope->count() && !revoke->count() && !listFlag->count())
      throw CLI::ValidationError("signoff", "give --scope and --meaning, --revoke ID or --list");
    action = [a] { return run(*a); };
  });
}

}  // namespace budledger::cli
