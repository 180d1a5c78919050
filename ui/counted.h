#pragma once
// counted(): "1 division" / "12 divisions" — English plurals without shipping
// a translation file; both forms go through tr() at the call site.
#include <QString>

namespace budledger::ui {

inline QString counted(long n, const QString& one, const QString& many) {
  return (n == 1 ? one : many).arg(n);
}

}  // namespace budledger::ui
