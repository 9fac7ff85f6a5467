// The reader's view of one segment (IndexReader::Segment is declared in
// kindred/index.h and defined here, so that the reader's source files share
// it).
#ifndef KINDRED_INDEX_READER_SEGMENT_H_
#define KINDRED_INDEX_READER_SEGMENT_H_

#include "index/segment.h"
#include "kindred/index.h"

namespace kindred {

struct IndexReader::Segment : index::SegmentView {};

}  // namespace kindred

#endif  // KINDRED_INDEX_READER_SEGMENT_H_
