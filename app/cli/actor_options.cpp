#include "app/cli/actor_options.h"

#include <fmt/format.h>

#include <cstdlib>

namespace budledger::cli {

void addActorOptions(CLI::App* sub, ActorOptions& o, const std::string& defaultRole) {
  sub->add_option("--as", o.name, "Who makes the entry (default: $USER)");
  auto* role = sub->add_option("--role", o.role, "The role they act in");
  if (!defaultRole.empty()) role->default_val(defaultRole);
  sub->add_option("--reason", o.reason, "Why (recorded in the journal)");
}

store::Actor resolveActor(const ActorOptions& o) {
  std::string name = o.name;
  if (name.empty())
    for (const char* var : {"USER", "LOGNAME"})
      if (const char* v = std::getenv(var); v && *v) {
        name = v;
        break;
      }
  if (name.empty()) throw std::runtime_error("say who you are with --as NAME ($USER is not set)");
  if (o.role.empty()) throw std::runtime_error("say in which role with --role ROLE");
  return {name, o.role};
}

int positionId(store::Project& project, const std::string& name) {
  if (auto p = project.positionByName(name)) return p->id;
  std::string known;
  for (const auto& p : project.positions()) known += (known.empty() ? "" : ", ") + p.name;
  throw std::runtime_error(fmt::format("{}: no position named '{}' (positions: {})", project.path(),
                                       name, known.empty() ? "none" : known));
}

store::Scope parseScope(store::Project& project, const std::string& text) {
  if (text == "experiment") return store::Scope::experiment();
  if (text.starts_with("position:"))
    return store::Scope::ofPosition(positionId(project, text.substr(9)));
  if (text.starts_with("trap:")) {
    const auto rest = text.substr(5);
    const auto slash = rest.rfind('/');
    if (slash != std::string::npos) {
      try {
        std::size_t used = 0;
        const int trap = std::stoi(rest.substr(slash + 1), &used);
        if (used == rest.size() - slash - 1)
          return store::Scope::ofTrap(positionId(project, rest.substr(0, slash)), trap);
      } catch (const std::logic_error&) {
      }
    }
  }
  throw std::runtime_error(
      fmt::format("scope '{}' is not one of experiment, position:NAME, trap:NAME/TRAP", text));
}

}  // namespace budledger::cli
