#pragma once
// The options every journaled verb shares: who acts (--as, default $USER),
// in which role (--role) and why (--reason), and how a named position or
// scope on the command line becomes ids.
#include <CLI/CLI.hpp>

#include <string>

#include "core/store/journal.h"
#include "core/store/project.h"
#include "core/store/scope.h"

namespace budledger::cli {

struct ActorOptions {
  std::string name;
  std::string role;
  std::string reason;
};

// Adds --as, --role (defaulting to `defaultRole`; none when empty) and --reason.
void addActorOptions(CLI::App* sub, ActorOptions& options, const std::string& defaultRole);

// The actor named on the command line, else $USER; throws when there is no
// name or no role.
store::Actor resolveActor(const ActorOptions& options);

int positionId(store::Project& project, const std::string& name);
// "experiment", "position:NAME" or "trap:NAME/T".
store::Scope parseScope(store::Project& project, const std::string& text);

}  // namespace budledger::cli
