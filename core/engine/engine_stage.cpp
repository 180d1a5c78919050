#include "core/engine/engine_stage.h"

#include <cmath>

#include <fmt/format.h>

#include "budledger/version.h"
#include "core/base/sha256.h"

namespace budledger::engine {

bool frameIsInformative(const registration::FrameDrift& d) {
  // Interpolated frames could not be registered; blurred ones show no cells reliably.
  return !(d.flags & registration::FrameDrift::kInterpolated) && d.focus >= 0.6;
}

EngineStage::EngineStage(EngineOptions options, measure::OccupancyModel model, Progress progress)
    : options_(std::move(options)), model_(std::move(model)), progress_(std::move(progress)) {}

void EngineStage::begin(const pipeline::PositionContext& context) {
  context_ = context;
  frames_ = context.info ? context.info->frames : 0;
  crops_.clear();
  trapIds_.clear();
  informative_.assign(static_cast<std::size_t>(frames_), false);
  pending_ = EngineResult{};
  ran_ = false;
  window_ = {};
  if (!context.layout) return;
  // The crop box is relative to the cup centre, so the centre sits at minus its corner.
  // Only a window of options_.windowUm around the cup is kept and measured.
  const cv::Rect& crop = context.layout->crop;
  window_ = cv::Rect(0, 0, crop.width, crop.height);
  const double pixelUm = context.pixelUm > 0 ? context.pixelUm : 0.25;
  if (options_.windowUm > 0) {
    const int half = static_cast<int>(std::ceil(0.5 * options_.windowUm / pixelUm));
    const cv::Rect around(-crop.x - half, -crop.y - half, 2 * half + 1, 2 * half + 1);
    window_ &= around;
    if (window_.empty()) window_ = cv::Rect(0, 0, crop.width, crop.height);
  }
  cup_ = {-static_cast<double>(crop.x + window_.x), -static_cast<double>(crop.y + window_.y)};
  for (const auto& t : context.layout->traps) trapIds_.push_back(t.id);
  crops_.assign(trapIds_.size(), std::vector<cv::Mat>(static_cast<std::size_t>(frames_)));
}

void EngineStage::frame(const pipeline::FrameView& view) {
  if (!view.crops || view.frame < 0 || view.frame >= frames_) return;
  const auto t = static_cast<std::size_t>(view.frame);
  for (std::size_t i = 0; i < crops_.size() && i < view.crops->size(); ++i)
    (*view.crops)[i].copyTo(crops_[i][t]);  // cut to window_ already (cropWindow())
  informative_[t] = view.drift && frameIsInformative(*view.drift);
  if (view.frame == frames_ - 1) run();
}

void EngineStage::run() {
  ran_ = true;
  int usable = 0;
  for (bool b : informative_) usable += b;
  const bool failed = frames_ > 0 && usable < frames_ / 2;
  if (failed || crops_.empty()) {
    pending_.note = crops_.empty() ? "no traps: nothing to measure"
                                   : fmt::format(
                                         "registration failed on {} of {} frames: no "
                                         "events proposed",
                                         frames_ - usable, frames_);
    for (int id : trapIds_) pending_.flags.push_back({id, "registration-failed"});
  } else {
    EngineInputs in;
    in.intervalMin = context_.intervalMin > 0 ? context_.intervalMin : 10.0;
    in.pixelUm = context_.pixelUm > 0 ? context_.pixelUm : 0.25;
    in.cup = cup_;
    in.cropOrigin = window_.tl();
    in.trapIds = trapIds_;
    in.crops = &crops_;
    in.informative = informative_;
    pending_ = runEngine(in, options_, model_, progress_);
    if (context_.intervalMin <= 0 || context_.pixelUm <= 0)
      pending_.note += fmt::format("{}frame interval or pixel size unknown: assumed {} min, {} um",
                                   pending_.note.empty() ? "" : "; ", in.intervalMin, in.pixelUm);
  }
  crops_.clear();  // the crops are not needed any more
}

void EngineStage::commit(store::Project& /*project*/, const pipeline::PositionContext& context) {
  if (!ran_) run();
  PositionOutcome o;
  o.positionId = context.positionId;
  o.name = context.name;
  o.frames = frames_;
  o.result = std::move(pending_);
  for (auto& e : o.result.events) e.position = context.positionId;
  for (auto& m : o.result.measurements) m.position = context.positionId;
  outcomes_.push_back(std::move(o));
  pending_ = EngineResult{};
}

std::int64_t EngineStage::writeRun(store::Project& project) {
  if (outcomes_.empty()) return 0;
  nlohmann::json params = parametersJson(options_);
  nlohmann::json positions = nlohmann::json::array();
  std::vector<Event> proposals;
  for (const auto& o : outcomes_) {
    nlohmann::json flags = nlohmann::json::array();
    for (const auto& f : o.result.flags) flags.push_back({{"trap", f.trap}, {"reason", f.reason}});
    positions.push_back({{"position", o.positionId},
                         {"name", o.name},
                         {"calibration", o.result.calibration},
                         {"note", o.result.note},
                         {"trap_flags", flags},
                         {"seconds", o.result.seconds}});
    proposals.insert(proposals.end(), o.result.events.begin(), o.result.events.end());
  }
  params["positions"] = positions;
  std::string digests;
  for (const auto& in : project.inputs()) digests += in.sha256;
  store::EngineRun run;
  run.startedUtc = store::utcNowIso();
  run.engineVersion = kVersion;
  run.parametersJson = params.dump();
  run.inputDigest = sha256Hex(digests);
  // The run replaces the proposals of the positions it analysed and no
  // others: a project grown by several analyses keeps every position's events.
  store::RunRecording recording;
  for (const auto& o : outcomes_) recording.positions.push_back(o.positionId);
  const std::int64_t id = project.addEngineRun(run, proposals, recording);
  for (const auto& o : outcomes_) project.addMeasurements(id, o.result.measurements);
  return id;
}

}  // namespace budledger::engine
