#include "core/io/metadata.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <map>
#include <string>

namespace budledger::io {
namespace {

// A deliberately small XML scanner: OME-XML in a TIFF is machine-written,
// and we need the attributes of a few elements, not a document tree.
struct Element {
  std::string name;  // local name, namespace prefix removed
  std::map<std::string, std::string> attributes;
};

std::string decodeEntities(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  for (size_t i = 0; i < s.size(); ++i) {
    if (s[i] != '&') {
      out += s[i];
      continue;
    }
    static constexpr std::pair<std::string_view, char> kEntities[] = {
        {"&amp;", '&'}, {"&lt;", '<'}, {"&gt;", '>'}, {"&quot;", '"'}, {"&apos;", '\''}};
    bool done = false;
    for (const auto& [entity, ch] : kEntities) {
      if (s.substr(i, entity.size()) == entity) {
        out += ch;
        i += entity.size() - 1;
        done = true;
        break;
      }
    }
    if (!done) out += '&';
  }
  return out;
}

bool isNameChar(char c) {
  return std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == '-' || c == ':' ||
         c == '.';
}

// Every start tag of the document, in order, with its attributes.
std::vector<Element> startTags(std::string_view xml) {
  std::vector<Element> out;
  size_t i = 0;
  while ((i = xml.find('<', i)) != std::string_view::npos) {
    ++i;
    if (i >= xml.size()) break;
    const char first = xml[i];
    if (first == '/' || first == '?' || first == '!') continue;
    size_t j = i;
    while (j < xml.size() && isNameChar(xml[j])) ++j;
    Element e;
    std::string_view name = xml.substr(i, j - i);
    if (const auto colon = name.rfind(':'); colon != std::string_view::npos)
      name = name.substr(colon + 1);
    e.name = std::string(name);
    // Attributes until '>' (quoted values may contain '>').
    while (j < xml.size() && xml[j] != '>') {
      while (j < xml.size() && std::isspace(static_cast<unsigned char>(xml[j]))) ++j;
      size_t k = j;
      while (k < xml.size() && isNameChar(xml[k])) ++k;
      if (k == j) {
        ++j;
        continue;
      }
      std::string key(xml.substr(j, k - j));
      if (const auto colon = key.rfind(':'); colon != std::string::npos)
        key = key.substr(colon + 1);
      while (k < xml.size() && std::isspace(static_cast<unsigned char>(xml[k]))) ++k;
      if (k >= xml.size() || xml[k] != '=') {
        j = k;
        continue;
      }
      ++k;
      while (k < xml.size() && std::isspace(static_cast<unsigned char>(xml[k]))) ++k;
      if (k >= xml.size() || (xml[k] != '"' && xml[k] != '\'')) {
        j = k;
        continue;
      }
      const char quote = xml[k];
      const size_t end = xml.find(quote, k + 1);
      if (end == std::string_view::npos) break;
      e.attributes[key] = decodeEntities(xml.substr(k + 1, end - k - 1));
      j = end + 1;
    }
    out.push_back(std::move(e));
    i = j;
  }
  return out;
}

std::optional<double> number(std::string_view s) {
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  if (!s.empty() && s.front() == '+') s.remove_prefix(1);
  double v = 0;
  const auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  if (ec != std::errc() || p == s.data() || !std::isfinite(v)) return std::nullopt;
  return v;
}

std::optional<int> integer(std::string_view s) {
  const auto v = number(s);
  if (!v || *v < 0 || *v != std::floor(*v) || *v > 1e9) return std::nullopt;
  return static_cast<int>(*v);
}

const std::string* attr(const Element& e, const char* key) {
  const auto it = e.attributes.find(key);
  return it == e.attributes.end() ? nullptr : &it->second;
}

std::optional<double> positive(const std::optional<double>& v) {
  if (v && *v > 0) return v;
  return std::nullopt;
}

StackMetadata parseOme(std::string_view xml) {
  StackMetadata md;
  md.kind = StackMetadata::Kind::OmeXml;
  const auto tags = startTags(xml);
  bool inFirstImage = false, seenImage = false, seenPixels = false;
  std::vector<double> deltaT;  // (t, DeltaT in minutes) of c=0,z=0 planes
  std::vector<int> deltaTIndex;
  for (const auto& e : tags) {
    if (e.name == "Image") {
      // A multi-series file describes several images; the first one is the stack.
      inFirstImage = !seenImage;
      seenImage = true;
      continue;
    }
    if (seenImage && !inFirstImage) continue;
    if (e.name == "Pixels" && !seenPixels) {
      seenPixels = true;
      if (auto* v = attr(e, "SizeT")) md.sizeT = integer(*v);
      if (auto* v = attr(e, "SizeC")) md.sizeC = integer(*v);
      if (auto* v = attr(e, "SizeZ")) md.sizeZ = integer(*v);
      if (auto* v = attr(e, "DimensionOrder")) md.dimensionOrder = *v;
      if (auto* v = attr(e, "TimeIncrement")) {
        const auto* u = attr(e, "TimeIncrementUnit");
        if (auto n = number(*v)) md.intervalMin = positive(toMinutes(*n, u ? *u : "s"));
      }
      for (const auto& [key, unitKey, target] :
           {std::tuple{"PhysicalSizeX", "PhysicalSizeXUnit", &md.pixelUmX},
            std::tuple{"PhysicalSizeY", "PhysicalSizeYUnit", &md.pixelUmY}}) {
        if (auto* v = attr(e, key)) {
          const auto* u = attr(e, unitKey);
          if (auto n = number(*v)) *target = positive(toMicrometres(*n, u ? *u : "µm"));
        }
      }
    } else if (e.name == "Channel" && seenPixels) {
      const auto* n = attr(e, "Name");
      const auto* id = attr(e, "ID");
      md.channels.push_back(n ? *n : id ? *id : "channel " + std::to_string(md.channels.size()));
    } else if (e.name == "TiffData" && seenPixels) {
      const auto* ifd = attr(e, "IFD");
      const int count = attr(e, "PlaneCount") ? integer(*attr(e, "PlaneCount")).value_or(1) : 1;
      if (attr(e, "FileName")) md.otherFile = *attr(e, "FileName");
      if (ifd && count == 1) {
        PlaneIndex p;
        p.page = integer(*ifd).value_or(-1);
        p.t = attr(e, "FirstT") ? integer(*attr(e, "FirstT")).value_or(0) : 0;
        p.c = attr(e, "FirstC") ? integer(*attr(e, "FirstC")).value_or(0) : 0;
        p.z = attr(e, "FirstZ") ? integer(*attr(e, "FirstZ")).value_or(0) : 0;
        if (p.page >= 0) md.explicitPlanes.push_back(p);
      }
    } else if (e.name == "Plane" && seenPixels) {
      const auto* dt = attr(e, "DeltaT");
      const bool firstPlane = (!attr(e, "TheC") || *attr(e, "TheC") == "0") &&
                              (!attr(e, "TheZ") || *attr(e, "TheZ") == "0");
      if (dt && firstPlane && attr(e, "TheT")) {
        const auto* u = attr(e, "DeltaTUnit");
        const auto t = integer(*attr(e, "TheT"));
        const auto v = number(*dt);
        if (t && v) {
          if (auto m = toMinutes(*v, u ? *u : "s")) {
            deltaTIndex.push_back(*t);
            deltaT.push_back(*m);
          }
        }
      }
    }
  }
  // No TimeIncrement: the median step of the planes' DeltaT stands in.
  if (!md.intervalMin && deltaT.size() >= 2) {
    std::vector<double> steps;
    for (size_t i = 1; i < deltaT.size(); ++i)
      if (deltaTIndex[i] > deltaTIndex[i - 1])
        steps.push_back((deltaT[i] - deltaT[i - 1]) / (deltaTIndex[i] - deltaTIndex[i - 1]));
    if (!steps.empty()) {
      std::nth_element(steps.begin(), steps.begin() + static_cast<long>(steps.size() / 2),
                       steps.end());
      md.intervalMin = positive(steps[steps.size() / 2]);
    }
  }
  // A plain "<TiffData/>" or an IFD-only list in plane order adds no information.
  if (md.explicitPlanes.size() <= 1) md.explicitPlanes.clear();
  return md;
}

// ImageJ writes "key=value" lines: images, channels, slices, frames,
// finterval (in tunit, default seconds), unit, spacing.
StackMetadata parseImageJ(std::string_view text) {
  StackMetadata md;
  md.kind = StackMetadata::Kind::ImageJ;
  std::map<std::string, std::string> kv;
  size_t i = 0;
  while (i < text.size()) {
    size_t end = text.find('\n', i);
    if (end == std::string_view::npos) end = text.size();
    const auto line = text.substr(i, end - i);
    if (const auto eq = line.find('='); eq != std::string_view::npos)
      kv[std::string(line.substr(0, eq))] = std::string(line.substr(eq + 1));
    i = end + 1;
  }
  auto get = [&](const char* k) -> const std::string* {
    auto it = kv.find(k);
    return it == kv.end() ? nullptr : &it->second;
  };
  if (auto* v = get("frames")) md.sizeT = integer(*v);
  if (auto* v = get("channels")) md.sizeC = integer(*v);
  if (auto* v = get("slices")) md.sizeZ = integer(*v);
  md.dimensionOrder = "XYCZT";  // ImageJ hyperstack order
  if (auto* v = get("unit")) md.lengthUnit = *v;
  if (auto* v = get("finterval")) {
    const auto* u = get("tunit");
    if (auto n = number(*v)) md.intervalMin = positive(toMinutes(*n, u ? *u : "s"));
  }
  return md;
}

}  // namespace

std::optional<double> toMinutes(double value, std::string_view unit) {
  static const std::map<std::string, double, std::less<>> kPerMinute{
      {"h", 60.0},        {"hr", 60.0},       {"hour", 60.0},       {"min", 1.0},
      {"s", 1.0 / 60},    {"sec", 1.0 / 60},  {"second", 1.0 / 60}, {"ms", 1.0 / 60e3},
      {"µs", 1.0 / 60e6}, {"μs", 1.0 / 60e6}, {"us", 1.0 / 60e6},   {"ns", 1.0 / 60e9},
      {"d", 1440.0},      {"minute", 1.0},    {"minutes", 1.0},     {"seconds", 1.0 / 60}};
  const auto it = kPerMinute.find(unit);
  if (it == kPerMinute.end()) return std::nullopt;
  return value * it->second;
}

std::optional<double> toMicrometres(double value, std::string_view unit) {
  static const std::map<std::string, double, std::less<>> kPerUm{
      {"µm", 1.0},  {"μm", 1.0}, {"um", 1.0}, {"micron", 1.0}, {"microns", 1.0}, {"nm", 1e-3},
      {"pm", 1e-6}, {"Å", 1e-4}, {"mm", 1e3}, {"cm", 1e4},     {"m", 1e6}};
  const auto it = kPerUm.find(unit);
  if (it == kPerUm.end()) return std::nullopt;
  return value * it->second;
}

int pageFor(std::string_view order, int t, int c, int z, int sizeT, int sizeC, int sizeZ) {
  // order is e.g. "XYZCT": the dimension after XY varies fastest.
  int page = 0, stride = 1;
  for (size_t i = 2; i < order.size() && i < 5; ++i) {
    switch (order[i]) {
      case 'T':
        page += t * stride;
        stride *= sizeT;
        break;
      case 'C':
        page += c * stride;
        stride *= sizeC;
        break;
      case 'Z':
        page += z * stride;
        stride *= sizeZ;
        break;
      default:
        break;
    }
  }
  return page;
}

StackMetadata parseImageDescription(std::string_view d) {
  const auto start = d.find_first_not_of(" \t\r\n");
  if (start == std::string_view::npos) return {};
  d.remove_prefix(start);
  if (d.substr(0, 7) == "ImageJ=") return parseImageJ(d);
  if (d.front() == '<' && d.find("OME") != std::string_view::npos &&
      d.find("Pixels") != std::string_view::npos)
    return parseOme(d);
  return {};
}

}  // namespace budledger::io
