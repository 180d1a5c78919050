// budledger-sim-figure STACK.ome.tif OUT.png [--frames a,b,c] [--crop x,y,w,h] [--scale k]
// Renders chosen pages of a 16-bit stack side by side as an 8-bit PNG for the
// documentation (contrast stretched per montage from the 0.5/99.5 percentiles).
#include <opencv2/imgcodecs.hpp>
#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cstdio>
#include <sstream>
#include <string>
#include <vector>

namespace {
std::vector<int> parseList(const std::string& s) {
  std::vector<int> v;
  std::stringstream ss(s);
  std::string item;
  while (std::getline(ss, item, ',')) v.push_back(std::stoi(item));
  return v;
}
}  // namespace

int main(int argc, char** argv) {
  if (argc < 3) {
    std::fprintf(
        stderr,
        "usage: budledger-sim-figure STACK OUT.png [--frames a,b] [--crop x,y,w,h] [--scale k]\n");
    return 2;
  }
  std::vector<int> frames{0};
  std::vector<int> crop;
  double scale = 1.0;
  for (int i = 3; i + 1 < argc; i += 2) {
    const std::string k = argv[i];
    if (k == "--frames") frames = parseList(argv[i + 1]);
    if (k == "--crop") crop = parseList(argv[i + 1]);
    if (k == "--scale") scale = std::stod(argv[i + 1]);
  }
  std::vector<cv::Mat> pages;
  if (!cv::imreadmulti(argv[1], pages, cv::IMREAD_UNCHANGED) || pages.empty()) {
    std::fprintf(stderr, "cannot read %s\n", argv[1]);
    return 1;
  }
  std::vector<cv::Mat> tiles;
  for (int f : frames) {
    if (f < 0 || f >= static_cast<int>(pages.size())) continue;
    cv::Mat m = pages[static_cast<std::size_t>(f)];
    if (crop.size() == 4) m = m(cv::Rect(crop[0], crop[1], crop[2], crop[3]));
    tiles.push_back(m.clone());
  }
  cv::Mat all;
  cv::hconcat(tiles, all);
  cv::Mat flat = all.reshape(1, 1).clone();
  cv::sort(flat, flat, cv::SORT_ASCENDING);
  const double lo = flat.at<std::uint16_t>(0, static_cast<int>(flat.cols * 0.005));
  const double hi = flat.at<std::uint16_t>(0, static_cast<int>(flat.cols * 0.995));
  cv::Mat out;
  all.convertTo(out, CV_8U, 255.0 / std::max(1.0, hi - lo), -lo * 255.0 / std::max(1.0, hi - lo));
  if (scale != 1.0) cv::resize(out, out, cv::Size(), scale, scale, cv::INTER_NEAREST);
  // Thin white separators between tiles.
  const int tw = static_cast<int>(tiles[0].cols * scale);
  for (std::size_t i = 1; i < tiles.size(); ++i)
    cv::line(out, {static_cast<int>(i) * tw, 0}, {static_cast<int>(i) * tw, out.rows - 1}, 255, 2);
  cv::imwrite(argv[2], out);
  return 0;
}
