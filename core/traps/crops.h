#pragma once
// Registered crops: the box `layout.crop` around a trap's centre, moved by
// the frame's drift, so that the same trap fills the same pixels of its crop
// in every frame. Crops keep the frame's pixel type. Where a crop reaches
// past the frame (edge traps, large drift) the frame's border is repeated.
#include <vector>

#include <opencv2/core.hpp>

#include "core/io/frame_source.h"
#include "core/register/drift.h"
#include "core/traps/trap_layout.h"

namespace budledger::traps {

enum class CropSampling {
  Nearest,  // whole-pixel shift: raw pixel values, no smoothing (measurement)
  Linear,   // sub-pixel shift by bilinear interpolation (thumbnails, overlays)
};

// The crop `box` (relative to `centre`) of a frame in which frame-0 content
// has moved by `drift`. With a non-empty `window` (in the box's pixels) only
// that part of the box is cut, pixel for pixel as the whole box would have it.
void cropAt(const cv::Mat& frame, cv::Point2d centre, cv::Point2d drift, const cv::Rect& box,
            CropSampling sampling, cv::Mat& out, const cv::Rect& window = {});

// Crops of every trap of `layout` in one frame, in trap order; `out` is
// resized and its buffers reused. `window` as for cropAt().
void cropAll(const cv::Mat& frame, const TrapLayout& layout, cv::Point2d drift,
             CropSampling sampling, std::vector<cv::Mat>& out, const cv::Rect& window = {});

// Random access to the crop of any trap at any frame, for the workstation's
// thumbnails and the engine's second looks: decodes a frame only when it
// changes. One CropReader per thread.
class CropReader {
 public:
  CropReader(io::FrameSource& source, const TrapLayout& layout,
             const registration::DriftTrack& drift);
  // Throws InputError for a bad frame; std::out_of_range for an unknown trap.
  cv::Mat crop(int trapId, int frame, CropSampling sampling = CropSampling::Linear);

 private:
  io::FrameSource& source_;
  const TrapLayout& layout_;
  const registration::DriftTrack& drift_;
  cv::Mat frame_;
  int loaded_ = -1;
};

}  // namespace budledger::traps
