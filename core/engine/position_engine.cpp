#include "core/engine/position_engine.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <atomic>
#include <chrono>
#include <cmath>
#include <limits>
#include <numbers>
#include <utility>

#include "budledger/version.h"
#include "core/base/median.h"
#include "core/base/parallel_for.h"
#include "core/measure/background.h"
#include "core/measure/background_search.h"
#include "core/measure/features.h"

namespace budledger::engine {
namespace {

// A piece attached to the mother and pressed against a neighbour is a seam, not a bud,
// while it is smaller than this share of her area (a bud that grows on against the
// neighbour passes it within a frame or two).
constexpr double kSeamArea = 0.15;

Occupancy argmaxOccupancy(const measure::ClassProbabilities& p) {
  return static_cast<Occupancy>(std::max_element(p.begin(), p.end()) - p.begin());
}

std::string_view roleName(measure::CellRole r) {
  switch (r) {
    case measure::CellRole::Mother:
      return "mother";
    case measure::CellRole::Bud:
      return "bud";
    case measure::CellRole::Other:
      return "other";
  }
  return "other";
}

std::string featuresJson(const measure::CropReading& r, const measure::FrameFeatures& f,
                         bool informative, const std::vector<std::string>& review,
                         cv::Point origin) {
  nlohmann::json j;
  if (!informative) j["informative"] = false;
  auto round3 = [](double v) { return std::round(v * 1000) / 1000; };
  for (const auto& c : r.cells)
    j["cells"].push_back({{"x", round3(c.x + origin.x)},
                          {"y", round3(c.y + origin.y)},
                          {"area_um2", round3(c.areaUm2)},
                          {"diameter_um", round3(c.diameterUm)},
                          {"eccentricity", round3(c.eccentricity)},
                          {"cup_dx_um", round3(c.cupDxUm)},
                          {"cup_dy_um", round3(c.cupDyUm)},
                          {"contrast", round3(c.contrast)},
                          {"role", std::string(roleName(c.role))}});
  if (f.hasMother) j["bud_ratio"] = round3(f.budRatio);
  if (!review.empty()) j["review"] = review;
  return j.dump();
}

}  // namespace

nlohmann::json parametersJson(const EngineOptions& o) {
  const auto& c = o.propose.cycle;
  const auto& s = o.segment;
  return {{"engine", "budledger"},
          {"version", kVersion},
          {"mother_diameter_um_start", o.motherDiameterUm},
          {"background_samples", o.backgroundSamples},
          {"window_um", o.windowUm},
          {"lodged_neighbour_min", o.lodgedMin},
          {"segment",
           {{"threshold_sd", s.threshold},
            {"smooth_sigma_px", s.smoothSigmaPx},
            {"min_cell_area_fraction", s.minCellAreaFraction},
            {"min_bud_area_fraction", s.minBudAreaFraction},
            {"seat_radius_factor", s.seatRadiusFactor},
            {"neck_ratio", s.neckRatio}}},
          {"temporal_model",
           {{"min_budded_min", c.minBuddedMin},
            {"mean_unbudded_min", c.meanUnbuddedMin},
            {"mean_budded_extra_min", c.meanBuddedExtraMin},
            {"budded_tail_stages", c.buddedTailStages},
            {"immediate_rebud", c.immediateRebud},
            {"arrival_per_min", c.arrivalPerMin},
            {"washout_per_min", c.washoutPerMin},
            {"death_per_min", c.deathPerMin},
            {"dead_gone_per_min", c.deadGonePerMin},
            {"death_onset_min", c.deathOnsetMin},
            {"em_iterations", o.propose.emIterations},
            {"emission_prior_weight", o.propose.emissionPriorWeight},
            {"transition_prior_weight", o.propose.transitionPriorWeight},
            {"confidence_temper", o.propose.confidenceTemper}}},
          {"review",
           {{"crowded_share", o.propose.review.crowdedShare},
            {"empty_share", o.propose.review.emptyShare},
            {"informative_share", o.propose.review.informativeShare}}}};
}

EngineResult runEngine(const EngineInputs& in, const EngineOptions& options,
                       const measure::OccupancyModel& model, const Progress& progress) {
  const auto start = std::chrono::steady_clock::now();
  EngineResult out;
  const auto& crops = *in.crops;
  const std::size_t N = crops.size();
  const int T = N ? static_cast<int>(crops.front().size()) : 0;
  if (N == 0 || T == 0) return out;
  std::vector<bool> informative = in.informative;
  informative.resize(static_cast<std::size_t>(T), true);

  // 1. Sample frames spread over the movie, informative ones only.
  std::vector<int> goodFrames;
  for (int t = 0; t < T; ++t)
    if (informative[static_cast<std::size_t>(t)]) goodFrames.push_back(t);
  std::vector<int> sampleFrames;
  const int S = std::min<int>(options.backgroundSamples, static_cast<int>(goodFrames.size()));
  for (int i = 0; i < S; ++i)
    sampleFrames.push_back(goodFrames[static_cast<std::size_t>(
        (static_cast<long>(i) * static_cast<long>(goodFrames.size())) / std::max(1, S))]);
  auto lap = [last = std::chrono::steady_clock::now()]() mutable {
    const auto now = std::chrono::steady_clock::now();
    const double s = std::chrono::duration<double>(now - last).count();
    last = now;
    return s;
  };
  nlohmann::json timing;
  progress("engine: background", 0.0);
  std::vector<std::vector<cv::Mat>> samples(N);
  parallelFor(N, options.threads, [&](std::size_t i) {
    for (int t : sampleFrames)
      samples[i].push_back(measure::normaliseCrop(crops[i][static_cast<std::size_t>(t)]));
  });

  // 2. Backgrounds, noise, outline sign and mother size, all from the data.
  const double startRadius = 0.5 * options.motherDiameterUm / in.pixelUm;
  measure::BackgroundOptions bo;
  bo.cupRadiusPx = 1.3 * startRadius;
  bo.threads = options.threads;
  cv::Point2d cup = in.cup;
  const measure::BackgroundSearch search(samples, bo);
  auto empties = search.empties(cup.x, cup.y);
  // The lattice's cup centre can sit a few pixels off the seat (it depends on the trap
  // shape and the optics). A cup disk straddling post edges sees their sub-pixel
  // residuals, and no two empty traps look alike (too few empties); a disk out in the
  // open medium cannot tell an occupied trap from an empty one (too many). Over the
  // cup itself the count is low and flat. So when the guess's count is either
  // implausible, disks of the usual size and smaller ones (which fit between posts
  // that a larger one straddles) are tried within two mother radii and, of those with
  // a plausible count, the one that finds the fewest empties is kept (nearest the
  // guess among equals). Both sizes compete: a large disk resting on a post's edge can
  // pass with a plausible count while a small one over the cup finds fewer (trying
  // small disks only when no large one passed lost every mother of one held-out
  // position, docs/validation.md). With none, the guess stays.
  const int sampled = static_cast<int>(N) * S;
  const int fewest = std::max(measure::BackgroundSearch::kMinEmpty, sampled / 50);
  const int most = sampled * 3 / 10;
  const int found = measure::countSamples(empties);
  if (found < fewest || found > most) {
    // Fewest empties first, then nearest the guess (grid units).
    std::pair<int, double> best{std::numeric_limits<int>::max(), 0.0};
    for (double radius : {bo.cupRadiusPx, 0.8 * startRadius})
      for (double fy = -2.0; fy <= 2.0; fy += 0.5)
        for (double fx = -2.0; fx <= 2.0; fx += 0.5) {
          const cv::Point2d c(in.cup.x + fx * startRadius, in.cup.y + fy * startRadius);
          auto e = search.empties(c.x, c.y, radius);
          const std::pair<int, double> score{measure::countSamples(e), std::hypot(fx, fy)};
          if (score.first < fewest || score.first > most || score >= best) continue;
          best = score;
          empties = std::move(e);
          cup = c;
        }
  }
  const auto background = search.model(std::move(empties));
  measure::SegmentParams seg = options.segment;
  seg.motherRadiusPx = startRadius;
  seg.keepMask = false;
  // Calibration runs per trap in parallel; results are pooled in trap order, so
  // they do not depend on the number of threads.
  std::vector<std::vector<double>> trapNoises(N);
  parallelFor(N, options.threads, [&](std::size_t i) {
    for (const auto& s : samples[i])
      trapNoises[i].push_back(
          measure::estimateNoise(s, background.background(i), seg.smoothSigmaPx));
  });
  std::vector<double> noises;
  for (const auto& v : trapNoises) noises.insert(noises.end(), v.begin(), v.end());
  const double noise = std::max(1e-9, upperMedian(noises));
  // Every other sample is plenty for the outline sign and the seat (they pool all traps).
  std::vector<measure::OutlineAreas> trapAreas(N);
  parallelFor(N, options.threads, [&](std::size_t i) {
    for (std::size_t k = 0; k < samples[i].size(); k += 2)
      trapAreas[i] += measure::outlineAreas(samples[i][k], background.background(i), noise, seg);
  });
  measure::OutlineAreas areas;
  for (const auto& a : trapAreas) areas += a;
  seg.polarity = measure::choosePolarity(areas);
  const measure::CropGeometry geometry{cup.x, cup.y, in.pixelUm};
  // Registration is good to a fraction of a pixel; the posts' edges then leave residuals
  // that the per-pixel noise map allows for.
  std::vector<const cv::Mat*> emptyCrops, emptyBackgrounds;
  for (std::size_t i = 0; i < N; ++i)
    for (int k : background.empties()[i]) {
      emptyCrops.push_back(&samples[i][static_cast<std::size_t>(k)]);
      emptyBackgrounds.push_back(&background.background(i));
    }
  const double shift =
      measure::estimateShift(emptyCrops, emptyBackgrounds, noise, seg.smoothSigmaPx);
  std::vector<cv::Mat> noiseMaps(N);
  parallelFor(N, options.threads, [&](std::size_t i) {
    noiseMaps[i] = measure::noiseMap(background.background(i), noise, shift, seg.smoothSigmaPx);
  });
  // Where mothers sit and how big they are, from the samples: the seat can be a mother
  // radius or more off the lattice's cup centre, and cell size varies with strain and
  // optics. Mothers are looked for within 1.5 expected radii of the seat so far, and the
  // seat moves to their median centre, a few rounds (each under 1.5 radii), so
  // that it can travel farther than one search reaches without a wider search picking
  // up neighbours and posts.
  measure::CropGeometry seatGeometry = geometry;
  measure::SegmentParams searching = seg;
  searching.seatRadiusFactor = 1.5 * seg.seatRadiusFactor;
  for (int round = 0; round < 3; ++round) {
    std::vector<std::vector<std::array<double, 3>>> trapMothers(N);  // area, x, y
    parallelFor(N, options.threads, [&](std::size_t i) {
      for (std::size_t k = 1; k < samples[i].size(); k += 2) {
        const auto r = measure::segmentCrop(samples[i][k], background.background(i), noise,
                                            seatGeometry, searching, &noiseMaps[i]);
        if (r.mother < 0) continue;
        const auto& m = r.cells[static_cast<std::size_t>(r.mother)];
        trapMothers[i].push_back({m.areaPx, m.x, m.y});
      }
    });
    std::vector<double> motherAreas, seatX, seatY;
    for (const auto& v : trapMothers)
      for (const auto& m : v) {
        motherAreas.push_back(m[0]);
        seatX.push_back(m[1]);
        seatY.push_back(m[2]);
      }
    if (motherAreas.size() < 5) break;
    seg.motherRadiusPx = std::clamp(std::sqrt(upperMedian(motherAreas) / std::numbers::pi),
                                    0.6 * startRadius, 1.6 * startRadius);
    const double dx = upperMedian(seatX) - seatGeometry.cupX,
                 dy = upperMedian(seatY) - seatGeometry.cupY;
    const double move = std::hypot(dx, dy);
    if (move >= 1.5 * seg.motherRadiusPx) break;
    seatGeometry.cupX += dx;
    seatGeometry.cupY += dy;
    if (move < 0.5) break;  // settled
  }
  out.calibration = {{"noise_sd", noise},
                     {"cup_disk_px", {cup.x, cup.y}},
                     {"polarity", seg.polarity},
                     {"mother_radius_px", seg.motherRadiusPx},
                     {"registration_shift_px", shift},
                     {"seat_px", {seatGeometry.cupX, seatGeometry.cupY}},
                     {"empty_samples", background.emptySamples()},
                     {"background_floor", background.noiseFloor()},
                     {"sample_frames", sampleFrames.size()}};
  if (background.quality() == measure::BackgroundModel::Quality::NoEmptyTrap)
    out.note =
        "no trap looked empty in any sampled frame: backgrounds are the lattice median "
        "of occupied traps, calls need review";

  timing["calibration_s"] = lap();
  // 3. Cells, features and occupancy in every crop; evidence for the temporal model.
  progress("engine: cells", 0.1);
  measure::FeatureContext fctx;
  fctx.motherRadiusPx = seg.motherRadiusPx;
  std::vector<propose::TrapEvidence> evidence(N);
  std::vector<std::vector<measure::CropReading>> readings(N);
  std::vector<std::vector<measure::FrameFeatures>> features(N);
  std::vector<std::vector<measure::ClassProbabilities>> probabilities(N);
  std::atomic<int> done{0};
  measure::SegmentParams segKeep = seg;
  segKeep.keepMask = true;
  const int lodgeFrames =
      std::max(4, static_cast<int>(std::ceil(options.lodgedMin / std::max(1e-9, in.intervalMin))));
  parallelFor(N, options.threads, [&](std::size_t i) {
    readings[i].resize(static_cast<std::size_t>(T));
    features[i].resize(static_cast<std::size_t>(T));
    probabilities[i].assign(static_cast<std::size_t>(T), {1, 0, 0, 0});
    evidence[i].resize(static_cast<std::size_t>(T));
    for (int t = 0; t < T; ++t) {
      const auto ut = static_cast<std::size_t>(t);
      if (!informative[ut]) continue;
      const cv::Mat crop = measure::normaliseCrop(crops[i][ut]);
      readings[i][ut] = measure::segmentCrop(crop, background.background(i), noise, seatGeometry,
                                             segKeep, &noiseMaps[i]);
    }
    // Per frame, the cells beside the mother that are not buds: lodged or let-go
    // neighbours, and the seams between her and them or a daughter already apart from
    // her (right after a daughter lets go, the seam read as an immediate new bud, two
    // frames early; a daughter leaving through the outlet gap left her part between the
    // posts against the mother, and the separation was missed). The rest of the cells
    // attached to her are the bud candidates.
    auto notBuds = measure::lodgedNeighbours(readings[i], fctx, lodgeFrames);
    std::vector<std::vector<int>> attached(static_cast<std::size_t>(T));
    for (int t = 0; t < T; ++t) {
      const auto ut = static_cast<std::size_t>(t);
      if (!informative[ut]) continue;
      auto& n = notBuds[ut];
      std::vector<int> pressing = measure::daughtersApart(readings[i][ut], fctx);
      pressing.insert(pressing.end(), n.begin(), n.end());
      const auto seams = measure::seamsAgainst(readings[i][ut], fctx, pressing, kSeamArea);
      n.insert(n.end(), seams.begin(), seams.end());
      for (const auto& a : measure::attachedCells(readings[i][ut], fctx))
        if (std::find(n.begin(), n.end(), a.cell) == n.end()) attached[ut].push_back(a.cell);
    }
    const std::vector<int> none;
    int previous = -1;  // last informative frame
    for (int t = 0; t < T; ++t) {
      const auto ut = static_cast<std::size_t>(t);
      propose::FrameEvidence& e = evidence[i][ut];
      if (!informative[ut]) {
        e.informative = false;
        continue;
      }
      features[i][ut] = measure::computeFeatures(readings[i][ut], fctx, notBuds[ut]);
      probabilities[i][ut] = model.predict(features[i][ut]);
      const auto& f = features[i][ut];
      e.occupancy = probabilities[i][ut];
      // A neighbour is no part of the bud ratio (computeFeatures), so a bud
      // growing beside her still counts: buds grow where there is room, not under her.
      e.budRatio = f.hasMother ? f.budRatio : propose::kMissing;
      if (f.hasMother)
        e.morph = {f.motherContrast, f.motherTexture, std::log(std::max(1.0, f.motherAreaPx))};
      if (previous >= 0 && f.hasMother) {
        int next = t + 1;
        while (next < T && !informative[static_cast<std::size_t>(next)]) ++next;
        const auto up = static_cast<std::size_t>(previous);
        const auto un = static_cast<std::size_t>(next);
        e.departure = measure::departedArea(
            readings[i][up], attached[up], readings[i][ut], attached[ut], 0.5 * seg.threshold,
            next < T ? &readings[i][un] : nullptr, next < T ? attached[un] : none);
      }
      previous = t;
    }
    for (auto& r : readings[i]) {
      r.mask.release();
      r.difference.release();
    }
    ++done;
  });

  timing["cells_s"] = lap();
  // 4. Events.
  progress("engine: events", 0.6);
  propose::ProposeOptions po = options.propose;
  po.cycle.intervalMin = in.intervalMin;
  po.threads = options.threads;
  const auto calls = propose::proposePosition(in.position, in.trapIds, evidence, po);
  out.calibration["temporal_model"] = {
      {"mean_unbudded_min", calls.cycle.meanUnbuddedMin},
      {"mean_budded_extra_min", calls.cycle.meanBuddedExtraMin},
      {"immediate_rebud", calls.cycle.immediateRebud},
      {"budded_frames", calls.buddedFrames},
      {"log_likelihood", calls.logLikelihood},
      {"occupancy_given_state", calls.emission.occupancy},
      {"bud_ratio_by_age", calls.emission.budRatioMean},
      {"bud_ratio_sigma", calls.emission.budRatioSigma},
      {"bud_ratio_unbudded",
       {calls.emission.budRatioUnbuddedMean, calls.emission.budRatioUnbuddedSigma}},
      {"bud_ratio_dead", {calls.emission.budRatioDeadMean, calls.emission.budRatioDeadSigma}},
      {"morph_live_sigma", calls.emission.morphLiveSigma},
      {"morph_dead_mean", calls.emission.morphDeadMean}};

  timing["events_s"] = lap();
  // 5. Records.
  progress("engine: records", 0.9);
  std::vector<std::vector<std::string>> reviews(N);
  for (std::size_t i = 0; i < N; ++i) {
    const auto& tc = calls.traps[i];
    out.events.insert(out.events.end(), tc.events.begin(), tc.events.end());
    reviews[i] = tc.flags;
    if (background.source(i) == measure::BackgroundModel::Source::Fallback)
      reviews[i].push_back("background-from-occupied-traps");
    for (const auto& r : reviews[i]) out.flags.push_back({in.trapIds[i], r});
  }
  // The records (JSON per trap-frame) in parallel, appended in trap order.
  std::vector<std::vector<store::MeasurementRecord>> records(N);
  parallelFor(N, options.threads, [&](std::size_t i) {
    const auto& review = reviews[i];
    records[i].reserve(static_cast<std::size_t>(T));
    for (int t = 0; t < T; ++t) {
      const auto ut = static_cast<std::size_t>(t);
      store::MeasurementRecord m;
      m.position = in.position;
      m.trap = in.trapIds[i];
      m.frame = t;
      const auto& p = probabilities[i][ut];
      m.occupancy = argmaxOccupancy(p);
      m.pEmpty = p[0];
      m.pSingle = p[1];
      m.pBudded = p[2];
      m.pCrowded = p[3];
      m.cellCount = static_cast<int>(readings[i][ut].cells.size());
      m.featuresJson =
          featuresJson(readings[i][ut], features[i][ut], informative[ut], review, in.cropOrigin);
      records[i].push_back(std::move(m));
    }
  });
  out.measurements.reserve(N * static_cast<std::size_t>(T));
  for (auto& r : records)
    out.measurements.insert(out.measurements.end(), std::make_move_iterator(r.begin()),
                            std::make_move_iterator(r.end()));
  timing["records_s"] = lap();
  out.calibration["timing"] = timing;
  if (options.keepFeatures) {
    out.features = std::move(features);
    out.evidence = std::move(evidence);
  }
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  progress("engine", 1.0);
  return out;
}

}  // namespace budledger::engine
