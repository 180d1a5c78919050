#pragma once
// budledger::io — reading time-lapse images: multi-page TIFF and BigTIFF
// stacks and folders of single-frame TIFFs, their OME-XML or ImageJ metadata,
// random access to any frame and a background reader that streams frames
// with a fixed memory budget.
#include "core/io/frame_source.h"
#include "core/io/frame_stream.h"
#include "core/io/image_folder.h"
#include "core/io/metadata.h"
#include "core/io/tiff_file.h"
