// Gives the resource library a translation unit of its own; Qt links the
// compiled .qrc objects into every program that links budledger::resources.
#include <QtGlobal>

namespace budledger::resources {
void ensureLinked() { Q_INIT_RESOURCE(budledger); }
}  // namespace budledger::resources
