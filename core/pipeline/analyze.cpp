#include "core/pipeline/analyze.h"

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <exception>
#include <set>
#include <thread>

#include "core/base/error.h"
#include "core/io/frame_stream.h"
#include "core/pipeline/digest.h"
#include "core/register/features.h"
#include "core/traps/crops.h"
#include "core/traps/structure_map.h"
#include "core/traps/temporal_median.h"

namespace budledger::pipeline {
namespace {

using Clock = std::chrono::steady_clock;
double since(Clock::time_point t) {
  return std::chrono::duration<double>(Clock::now() - t).count();
}

// Digests every input file on a helper thread while the frames are worked on.
class DigestJob {
 public:
  explicit DigestJob(const std::vector<io::InputFile>& files) : digests_(files.size()) {
    thread_ = std::thread([this, files] {
      try {
        for (size_t i = 0; i < files.size() && !cancel_; ++i)
          digests_[i] = digestFile(files[i].path, cancel_);
      } catch (...) {
        error_ = std::current_exception();
      }
    });
  }
  ~DigestJob() {
    cancel_ = true;
    if (thread_.joinable()) thread_.join();
  }
  std::vector<std::string> take() {
    thread_.join();
    if (error_) std::rethrow_exception(error_);
    return std::move(digests_);
  }

 private:
  std::vector<std::string> digests_;
  std::atomic<bool> cancel_{false};
  std::exception_ptr error_;
  std::thread thread_;
};

std::string firstFile(const io::StackInfo& info) {
  return info.files.empty() ? info.positionName : info.files.front().path.string();
}

// A focus measure of the frame's centre, to pick a sharp reference frame.
double centreFocus(const cv::Mat& frame) {
  const int w = std::min(frame.cols, 384), h = std::min(frame.rows, 384);
  return registration::focusMeasure(
      frame(cv::Rect((frame.cols - w) / 2, (frame.rows - h) / 2, w, h)));
}

}  // namespace

PositionAnalysis analyzeFrames(io::FrameSource& source, const AnalyzeOptions& options,
                               const Progress& progress, std::span<FrameStage* const> stages) {
  const auto start = Clock::now();
  PositionAnalysis out;
  out.info = source.info();
  const io::StackInfo& info = out.info;
  out.name = options.positionName.empty() ? info.positionName : options.positionName;
  out.intervalMin = options.intervalMin ? options.intervalMin : info.metadata.intervalMin;
  out.pixelUm = options.pixelUm ? options.pixelUm : info.metadata.pixelUmX;
  const int frames = info.frames;
  const std::string file = firstFile(info);
  if (frames < 2) throw InputError(file, std::nullopt, "a time-lapse needs at least two frames");

  std::unique_ptr<DigestJob> digests;
  if (options.digests) digests = std::make_unique<DigestJob>(info.files);

  // Survey: lattice vectors and the reference frame.
  auto t = Clock::now();
  progress("survey", 0.0);
  std::vector<cv::Mat> survey;
  for (int f : traps::spreadFrames(frames, options.surveyFrames)) survey.push_back(source.read(f));
  out.surveyLattice = traps::findLattice(survey, options.lattice);
  survey.clear();
  // Frame 0 is the reference (drift is relative to it) unless it is clearly
  // blurred; then the sharpest of the next few frames stands in.
  int reference = 0;
  cv::Mat referenceFrame = source.read(0);
  const double focus0 = centreFocus(referenceFrame);
  double bestFocus = focus0;
  for (int f = 1; f < std::min(frames, std::max(1, options.referenceCandidates)); ++f) {
    cv::Mat m = source.read(f);
    const double focus = centreFocus(m);
    if (focus > bestFocus && focus0 < 0.75 * focus) {
      bestFocus = focus;
      reference = f;
      referenceFrame = m;
    }
  }
  out.referenceFrame = reference;
  registration::RegistrationOptions reg = options.registration;
  cv::Mat structure;
  if (out.surveyLattice) {
    structure = traps::structureMap(referenceFrame, *out.surveyLattice);
    // Never search as far as a neighbouring trap: that is where a wrong,
    // lattice-shifted match would be.
    if (reg.searchRadius <= 0) reg.searchRadius = 0.45 * out.surveyLattice->minPitch();
    reg.latticeA = out.surveyLattice->a;
    reg.latticeB = out.surveyLattice->b;
  } else {
    out.note = "no trap lattice in the survey frames: registered on the whole image";
  }
  registration::Registrar registrar(referenceFrame, structure, reg);
  bool secondLook = options.secondLook;
  registration::TrackOptions track = options.tracking;
  track.referenceFrame = reference;
  registration::DriftTracker tracker(registrar, track);
  out.seconds.survey = since(t);

  // Registration pass, keeping a bounded sample for the temporal median.
  t = Clock::now();
  const std::size_t frameBytes =
      static_cast<std::size_t>(info.width) * static_cast<std::size_t>(info.height) * 2;
  const int budgetFrames =
      static_cast<int>(std::max<std::size_t>(5, options.projectionBudgetBytes / (2 * frameBytes)));
  const std::vector<int> sampled =
      traps::spreadFrames(frames, std::min(options.projectionFrames, budgetFrames));
  std::vector<std::pair<int, cv::Mat>> kept;
  {
    io::FrameStream stream(source, {options.readAhead, 0, frames});
    int index = 0;
    size_t nextSample = 0;
    while (const cv::Mat* frame = stream.next(&index)) {
      tracker.add(index, *frame);
      if (nextSample < sampled.size() && sampled[nextSample] == index) {
        kept.emplace_back(index, frame->clone());
        ++nextSample;
      }
      progress("registering", static_cast<double>(index + 1) / frames);
    }
  }
  out.drift = tracker.finish();
  const cv::Point2d raw0 = tracker.rawShift(0);  // frame 0 against the reference
  // Where the structure persists over the whole movie: the weights of the
  // second look, which no longer count cells that sit in most traps.
  if (!structure.empty() && options.secondLook && kept.size() >= 5) {
    const int rw = std::min(info.width, 384), rh = std::min(info.height, 384);
    const cv::Rect region((info.width - rw) / 2, (info.height - rh) / 2, rw, rh);
    const cv::Point2d centre(region.x + rw / 2, region.y + rh / 2);
    const cv::Rect box(-rw / 2, -rh / 2, rw, rh);
    std::vector<cv::Mat> features;
    cv::Mat patch;
    for (const auto& [f, m] : kept) {
      const auto& d = out.drift[static_cast<size_t>(f)];
      traps::cropAt(m, centre, cv::Point2d(d.dx, d.dy) + raw0, box, traps::CropSampling::Linear,
                    patch);
      features.emplace_back();
      registration::structureFeatures(patch, features.back(), {1.5, 0.0});
    }
    cv::Mat weights = structure.clone();
    cv::Mat part = weights(region);
    cv::multiply(part, traps::persistence(features), part);
    registrar.setStructure(weights);
  } else {
    secondLook = false;
  }
  out.seconds.registration = since(t);

  // Traps from the temporal median of the registered sample.
  t = Clock::now();
  progress("traps", 0.0);
  traps::TemporalMedian median(cv::Size(info.width, info.height), static_cast<int>(kept.size()));
  for (auto& [f, m] : kept) {
    const auto& d = out.drift[static_cast<size_t>(f)];
    median.add(m, {d.dx, d.dy});
    m.release();
  }
  kept.clear();
  const cv::Mat projection = median.median();
  // The survey's lattice is refitted to the matched traps below; only if the
  // survey found none is the (cleaner) projection searched again.
  std::optional<traps::Lattice> lattice = out.surveyLattice;
  if (!lattice) lattice = traps::findLattice({projection}, options.lattice);
  traps::TrapFinding found;
  if (lattice) found = traps::findTraps(projection, *lattice, options.finder);
  if (options.suppliedTraps) {
    out.layout = traps::layoutFromSupplied(*options.suppliedTraps, out.name,
                                           options.suppliedTrapsFile, &found.layout);
  } else if (!lattice) {
    throw InputError(file, std::nullopt,
                     "no repeating trap lattice found in the images; supply the trap centres with "
                     "--traps");
  } else if (found.layout.traps.empty()) {
    throw InputError(
        file, std::nullopt,
        fmt::format("no traps found ({}); supply the trap centres with --traps", found.note));
  } else {
    out.layout = std::move(found.layout);
  }
  cv::Point2d lo(0, 0), hi(0, 0);
  for (const auto& d : out.drift) {
    lo = {std::min(lo.x, d.dx), std::min(lo.y, d.dy)};
    hi = {std::max(hi.x, d.dx), std::max(hi.y, d.dy)};
  }
  traps::flagEdges(out.layout, cv::Size(info.width, info.height), lo, hi);
  progress("traps", 1.0);
  out.seconds.traps = since(t);

  // The second look (refinement with the persistent-structure weights) and
  // the stages that need every frame's crops share one more pass.
  if (secondLook || !stages.empty()) {
    t = Clock::now();
    PositionContext ctx;
    ctx.name = out.name;
    ctx.info = &out.info;
    ctx.drift = &out.drift;
    ctx.layout = &out.layout;
    ctx.intervalMin = out.intervalMin.value_or(0);
    ctx.pixelUm = out.pixelUm.value_or(0);
    for (FrameStage* s : stages) s->begin(ctx);
    // One set of crops per way of cutting them that some stage asked for.
    struct Cut {
      traps::CropSampling sampling;
      cv::Rect window;
      std::vector<cv::Mat> crops;
    };
    std::vector<Cut> cuts;
    std::vector<std::size_t> cutOf;  // per stage
    for (FrameStage* s : stages) {
      const traps::CropSampling sampling = s->sampling();
      const cv::Rect window = s->cropWindow();
      auto it = std::find_if(cuts.begin(), cuts.end(), [&](const Cut& c) {
        return c.sampling == sampling && c.window == window;
      });
      if (it == cuts.end()) it = cuts.insert(cuts.end(), Cut{sampling, window, {}});
      cutOf.push_back(static_cast<std::size_t>(it - cuts.begin()));
    }
    io::FrameStream stream(source, {options.readAhead, 0, frames});
    int index = 0;
    cv::Point2d newRaw0 = raw0;
    const std::string_view stage =
        stages.empty() ? std::string_view("refining") : stages.front()->name();
    while (const cv::Mat* frame = stream.next(&index)) {
      auto& d = out.drift[static_cast<size_t>(index)];
      if (secondLook && !(d.flags & registration::FrameDrift::kInterpolated)) {
        const auto m = registrar.refineOnly(*frame, cv::Point2d(d.dx, d.dy) + raw0);
        if (m.refined) {
          if (index == 0) newRaw0 = m.shift;
          d.dx = m.shift.x - newRaw0.x;
          d.dy = m.shift.y - newRaw0.y;
        }
      } else if (secondLook) {
        d.dx += raw0.x - newRaw0.x;
        d.dy += raw0.y - newRaw0.y;
      }
      if (!stages.empty()) {
        for (Cut& c : cuts)
          traps::cropAll(*frame, out.layout, {d.dx, d.dy}, c.sampling, c.crops, c.window);
        for (std::size_t k = 0; k < stages.size(); ++k) {
          FrameView view;
          view.frame = index;
          view.image = frame;
          view.drift = &d;
          view.crops = &cuts[cutOf[k]].crops;
          stages[k]->frame(view);
        }
      }
      progress(stage, static_cast<double>(index + 1) / frames);
    }
    out.seconds.stages = since(t);
  }

  if (digests) {
    t = Clock::now();
    progress("digests", 0.0);
    out.sha256 = digests->take();
    out.seconds.digests = since(t);  // only the wait beyond the other stages
  } else {
    out.sha256.assign(info.files.size(), std::string());
  }
  out.seconds.total = since(start);
  return out;
}

namespace {
void requireNewName(store::Project& project, const std::string& name, const std::string& file) {
  for (const auto& p : project.positions())
    if (p.name == name)
      throw InputError(
          file, std::nullopt,
          fmt::format("position '{}' is already in project '{}'", name, project.path()));
}
}  // namespace

int writePosition(store::Project& project, const PositionAnalysis& a, const AnalyzeOptions& options,
                  std::span<FrameStage* const> stages) {
  requireNewName(project, a.name, firstFile(a.info));
  store::Transaction tx(project.db());
  store::PositionRecord pos;
  pos.name = a.name;
  pos.group = options.group;
  pos.frameCount = a.info.frames;
  pos.width = a.info.width;
  pos.height = a.info.height;
  const int id = project.addPosition(pos);
  for (size_t i = 0; i < a.info.files.size(); ++i) {
    store::InputRecord in;
    in.position = id;
    std::error_code ec;
    auto abs = std::filesystem::absolute(a.info.files[i].path, ec);
    in.path = (ec ? a.info.files[i].path : abs.lexically_normal()).string();
    in.sizeBytes = static_cast<std::int64_t>(a.info.files[i].sizeBytes);
    in.sha256 = i < a.sha256.size() ? a.sha256[i] : std::string();
    project.addInput(in);
  }
  std::vector<store::DriftRecord> drift;
  drift.reserve(a.drift.size());
  for (const auto& d : a.drift) drift.push_back({id, d.frame, d.dx, d.dy, d.confidence, d.focus});
  project.replaceDrift(id, drift);
  std::vector<store::TrapRecord> trapRows;
  for (const auto& t : a.layout.traps)
    trapRows.push_back({id, t.id, t.row, t.col, t.centre.x, t.centre.y, t.edge});
  project.replaceTraps(id, trapRows);
  // Acquisition facts: per position, and for the project when first known.
  const std::string prefix = fmt::format("position.{}.", a.name);
  if (a.intervalMin) {
    project.setMeta(prefix + "interval_min", fmt::format("{}", *a.intervalMin));
    if (!project.meta("interval_min"))
      project.setMeta("interval_min", fmt::format("{}", *a.intervalMin));
  }
  if (a.pixelUm) {
    project.setMeta(prefix + "pixel_um", fmt::format("{}", *a.pixelUm));
    if (!project.meta("pixel_um")) project.setMeta("pixel_um", fmt::format("{}", *a.pixelUm));
  }
  if (!a.info.channelName.empty()) project.setMeta(prefix + "channel", a.info.channelName);
  project.setMeta(prefix + "reference_frame", std::to_string(a.referenceFrame));
  // The crop box thumbnails and measurements use, so views cut the same window.
  project.setMeta(prefix + "crop_box", fmt::format("{} {} {} {}", a.layout.crop.x, a.layout.crop.y,
                                                   a.layout.crop.width, a.layout.crop.height));
  project.setMeta(prefix + "trap_layout",
                  a.layout.source == traps::TrapLayout::Source::Supplied ? "supplied" : "detected");
  if (stages.size()) {
    PositionContext ctx;
    ctx.positionId = id;
    ctx.name = a.name;
    ctx.info = &a.info;
    ctx.drift = &a.drift;
    ctx.layout = &a.layout;
    ctx.intervalMin = a.intervalMin.value_or(0);
    ctx.pixelUm = a.pixelUm.value_or(0);
    for (FrameStage* s : stages) s->commit(project, ctx);
  }
  tx.commit();
  return id;
}

PositionAnalysis analyzePosition(store::Project& project, io::FrameSource& source,
                                 const AnalyzeOptions& options, const Progress& progress,
                                 std::span<FrameStage* const> stages) {
  const std::string name =
      options.positionName.empty() ? source.info().positionName : options.positionName;
  requireNewName(project, name, firstFile(source.info()));
  PositionAnalysis a = analyzeFrames(source, options, progress, stages);
  const auto t = Clock::now();
  progress("writing", 0.0);
  a.positionId = writePosition(project, a, options, stages);
  if (progress.report) progress.report("writing", 1.0);  // committed: too late to cancel
  a.seconds.write = since(t);
  return a;
}

}  // namespace budledger::pipeline
