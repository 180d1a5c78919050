#include "core/traps/crops.h"

#include <opencv2/imgproc.hpp>

#include <cmath>
#include <stdexcept>

namespace budledger::traps {
namespace {

// `out` starts `skip` pixels into the crop whose top-left source position is (x0, y0):
// the fraction comes from (x0, y0) alone, so a window is cut exactly as the whole crop.
template <typename T>
void bilinear(const cv::Mat& frame, double x0, double y0, cv::Point skip, cv::Mat& out) {
  const int ix = static_cast<int>(std::floor(x0)) + skip.x,
            iy = static_cast<int>(std::floor(y0)) + skip.y;
  const float fx = static_cast<float>(x0 - std::floor(x0)),
              fy = static_cast<float>(y0 - std::floor(y0));
  const int w = frame.cols, h = frame.rows;
  auto col = [w](int x) { return std::clamp(x, 0, w - 1); };
  // Columns whose both neighbours lie inside need no clamping (the usual case).
  const bool inside = ix >= 0 && ix + out.cols < w;
  for (int y = 0; y < out.rows; ++y) {
    const T* r0 = frame.ptr<T>(std::clamp(iy + y, 0, h - 1));
    const T* r1 = frame.ptr<T>(std::clamp(iy + y + 1, 0, h - 1));
    T* o = out.ptr<T>(y);
    if (inside) {
      const T* a0 = r0 + ix;
      const T* a1 = r1 + ix;
      for (int x = 0; x < out.cols; ++x) {
        const float v = (1 - fy) * ((1 - fx) * a0[x] + fx * a0[x + 1]) +
                        fy * ((1 - fx) * a1[x] + fx * a1[x + 1]);
        o[x] = cv::saturate_cast<T>(v);
      }
      continue;
    }
    for (int x = 0; x < out.cols; ++x) {
      const int a = col(ix + x), b = col(ix + x + 1);
      const float v =
          (1 - fy) * ((1 - fx) * r0[a] + fx * r0[b]) + fy * ((1 - fx) * r1[a] + fx * r1[b]);
      o[x] = cv::saturate_cast<T>(v);
    }
  }
}

}  // namespace

void cropAt(const cv::Mat& frame, cv::Point2d centre, cv::Point2d drift, const cv::Rect& box,
            CropSampling sampling, cv::Mat& out, const cv::Rect& window) {
  const cv::Rect part = window.empty() ? cv::Rect(0, 0, box.width, box.height) : window;
  out.create(part.size(), frame.type());
  const double x0 = centre.x + drift.x + box.x, y0 = centre.y + drift.y + box.y;
  if (sampling == CropSampling::Nearest) {
    const cv::Rect r(static_cast<int>(std::lround(x0)) + part.x,
                     static_cast<int>(std::lround(y0)) + part.y, part.width, part.height);
    if ((r & cv::Rect(0, 0, frame.cols, frame.rows)) == r) {
      frame(r).copyTo(out);
      return;
    }
    // Partly outside: repeat the frame's border (bilinear with no fraction).
    if (frame.depth() == CV_8U)
      bilinear<std::uint8_t>(frame, r.x, r.y, {0, 0}, out);
    else
      bilinear<std::uint16_t>(frame, r.x, r.y, {0, 0}, out);
    return;
  }
  if (frame.depth() == CV_8U)
    bilinear<std::uint8_t>(frame, x0, y0, part.tl(), out);
  else
    bilinear<std::uint16_t>(frame, x0, y0, part.tl(), out);
}

void cropAll(const cv::Mat& frame, const TrapLayout& layout, cv::Point2d drift,
             CropSampling sampling, std::vector<cv::Mat>& out, const cv::Rect& window) {
  out.resize(layout.traps.size());
  for (size_t i = 0; i < layout.traps.size(); ++i)
    cropAt(frame, layout.traps[i].centre, drift, layout.crop, sampling, out[i], window);
}

CropReader::CropReader(io::FrameSource& source, const TrapLayout& layout,
                       const registration::DriftTrack& drift)
    : source_(source), layout_(layout), drift_(drift) {}

cv::Mat CropReader::crop(int trapId, int frame, CropSampling sampling) {
  if (trapId < 0 || trapId >= static_cast<int>(layout_.traps.size()))
    throw std::out_of_range("no trap " + std::to_string(trapId));
  if (loaded_ != frame) {
    source_.read(frame, frame_);
    loaded_ = frame;
  }
  cv::Point2d d(0, 0);
  if (frame >= 0 && frame < static_cast<int>(drift_.size()))
    d = {drift_[static_cast<size_t>(frame)].dx, drift_[static_cast<size_t>(frame)].dy};
  cv::Mat out;
  cropAt(frame_, layout_.traps[static_cast<size_t>(trapId)].centre, d, layout_.crop, sampling, out);
  return out;
}

}  // namespace budledger::traps
