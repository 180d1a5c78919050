#pragma once
// CSV exports of the current state (after the journal): events.csv and
// lifespans.csv, with a header row. Columns (the Engine issue, item 5, plus
// the position's group after the position):
//   events.csv    position,group,trap_id,mother_id,frame,time_min,kind,confidence,status
//   lifespans.csv position,group,trap_id,mother_id,first_frame,last_frame,divisions,outcome,
//                 censor_reason
// status is proposed|accepted|moved|added|rejected; outcome is death|censored;
// censor_reason is washout|end-of-imaging, empty for a death. mother_id counts
// from 0 within a trap and is empty for rejected events, which belong to no
// tenure. time_min = frame × the project's interval_min, empty when unknown.
// Fields holding commas, quotes or line breaks are quoted (RFC 4180).
#include <ostream>

#include "core/store/project.h"

namespace budledger::exporting {

void writeEventsCsv(store::Project& project, std::ostream& out);
void writeLifespansCsv(store::Project& project, std::ostream& out);

}  // namespace budledger::exporting
