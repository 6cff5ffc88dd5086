// Same inputs, same PDF bytes. Qt stamps every PDF with the time it was
// written (/CreationDate and the XMP dates) and a random document /ID; these
// helpers give the writer fixed metadata and rewrite the stamps in place
// (same lengths, so the cross-reference offsets stay right).
#pragma once

#include <QByteArray>
#include <QString>

class QPdfWriter;

namespace moderato::ui {

// Title and creator, and XMP metadata without dates or a random id.
void prepareDeterministicPdf(QPdfWriter& writer, const QString& title);

// Replaces the creation date with SOURCE_DATE_EPOCH (when set) or
// 1970-01-01 00:00:00 UTC, and the /ID with a hash of the document.
void stabilisePdf(QByteArray& pdf);

}  // namespace moderato::ui
