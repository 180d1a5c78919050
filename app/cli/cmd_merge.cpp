// budledger-cli merge A.budledger B.budledger… --out P.budledger — combine
// per-position projects analysed on different machines into one experiment,
// refusing conflicting inputs with a message naming both files.
#include <fmt/format.h>

#include <memory>
#include <string>
#include <vector>

#include "app/cli/actor_options.h"
#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/store/merge.h"

namespace budledger::cli {
namespace {
struct MergeArgs {
  std::vector<std::string> sources;
  std::string out;
  ActorOptions actor;
};
}  // namespace

void addMergeCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand("merge", "Combine per-position projects into one experiment");
  auto a = std::make_shared<MergeArgs>();
  sub->add_option("projects", a->sources, "Projects to merge (two or more)")
      ->required()
      ->expected(2, -1);
  sub->add_option("--out", a->out, "The merged project (must not exist)")->required();
  addActorOptions(sub, a->actor, "analyst");
  sub->callback([&action, a] {
    action = [a] {
      const auto s = store::mergeProjects({a->sources, a->out, resolveActor(a->actor)});
      fmt::print("merged {} projects into {}: {} positions, {} journal entries\n",
                 a->sources.size(), a->out, s.positions, s.entries);
      return 0;
    };
  });
}

}  // namespace budledger::cli
