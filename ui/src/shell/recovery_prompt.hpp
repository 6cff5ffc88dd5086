// On start: edits that a crashed or killed workbench left unsaved
// (RecoveryStore::findOrphans) are offered back. For each copy the user
// chooses to restore the edits, to discard them, or to open both: the saved
// project in this window and the recovered edits in a second one beside it,
// so the two can be compared before one is saved.
//
// Restored edits show as unsaved and belong to their project file; when that
// file changed since the edits were made (or in the second window of "open
// both", which shares the file with the first), Save asks where to save.
#pragma once

#include <QString>

namespace moderato::ui {

class MainWindow;

enum class RecoveryAnswer { Ask, Restore, Discard, Both };

// MODERATO_RECOVERY_ANSWER=restore|discard|both answers without asking (for
// tests and scripts); anything else asks.
RecoveryAnswer recoveryAnswerFromEnvironment();

// Offers every copy in `window`'s recovery folder whose process has ended,
// and reports unreadable ones (moved aside). Returns whether `window` is now
// opening something (then a file named on the command line waits).
bool offerRecovery(MainWindow* window, RecoveryAnswer answer);

}  // namespace moderato::ui
