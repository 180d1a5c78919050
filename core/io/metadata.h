#pragma once
// What a stack's own metadata says about the acquisition: OME-XML (the open
// OME-TIFF convention, in the first page's ImageDescription) or an ImageJ
// hyperstack description. Every field is optional because files often omit
// them; the command line may override any of them.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace budledger::io {

// One plane of the stack as the metadata places it: which page (IFD) of the
// file holds time point t, channel c, focal plane z.
struct PlaneIndex {
  int t = 0, c = 0, z = 0;
  int page = 0;
};

struct StackMetadata {
  enum class Kind { None, OmeXml, ImageJ };
  Kind kind = Kind::None;
  std::optional<int> sizeT, sizeC, sizeZ;
  std::string dimensionOrder;         // OME DimensionOrder, e.g. "XYCZT"; empty if unknown
  std::optional<double> intervalMin;  // time between frames, minutes
  std::optional<double> pixelUmX;     // physical pixel size, micrometres
  std::optional<double> pixelUmY;
  std::vector<std::string> channels;       // channel names (or ids) in channel order
  std::vector<PlaneIndex> explicitPlanes;  // OME TiffData with explicit IFD numbers
  std::string otherFile;   // a TiffData naming another file (multi-file OME); unsupported
  std::string lengthUnit;  // ImageJ "unit=": the unit of the XResolution tag's pixels per unit
};

// Parses an ImageDescription. Unknown or malformed content yields Kind::None
// rather than an error: metadata is a help, never a reason to refuse pixels.
StackMetadata parseImageDescription(std::string_view description);

// Converts a value in the named unit to minutes / micrometres; nullopt for an
// unknown unit. Units follow OME's UnitsTime and UnitsLength symbols.
std::optional<double> toMinutes(double value, std::string_view unit);
std::optional<double> toMicrometres(double value, std::string_view unit);

// The page (IFD) holding (t, c, z) for a stack laid out in `order`
// (OME DimensionOrder, X and Y first). Used when no explicit planes exist.
int pageFor(std::string_view order, int t, int c, int z, int sizeT, int sizeC, int sizeZ);

}  // namespace budledger::io
