#include "export/pdf_stamp.hpp"

#include <QCryptographicHash>
#include <QDateTime>
#include <QPdfWriter>
#include <QRegularExpression>
#include <QTimeZone>

namespace moderato::ui {

void prepareDeterministicPdf(QPdfWriter& writer, const QString& title) {
    writer.setCreator(QStringLiteral("Moderato"));
    writer.setTitle(title);
    const QString escaped = title.toHtmlEscaped();
    const QString xmp = QStringLiteral(
                            "<?xpacket begin='' id='W5M0MpCehiHzreSzNTczkc9d'?>\n"
                            "<x:xmpmeta xmlns:x='adobe:ns:meta/'>\n"
                            "<rdf:RDF xmlns:rdf='http://www.w3.org/1999/02/22-rdf-syntax-ns#'>\n"
                            "<rdf:Description rdf:about='' xmlns:dc='http://purl.org/dc/elements/1.1/' "
                            "xmlns:xmp='http://ns.adobe.com/xap/1.0/'>\n"
                            "<dc:title><rdf:Alt><rdf:li xml:lang='x-default'>%1</rdf:li></rdf:Alt></dc:title>\n"
                            "<xmp:CreatorTool>Moderato</xmp:CreatorTool>\n"
                            "</rdf:Description>\n</rdf:RDF>\n</x:xmpmeta>\n<?xpacket end='w'?>\n")
                            .arg(escaped);
    writer.setDocumentXmpMetadata(xmp.toUtf8());
}

void stabilisePdf(QByteArray& pdf) {
    qint64 seconds = 0;
    bool ok = false;
    const qint64 epoch = qEnvironmentVariable("SOURCE_DATE_EPOCH").toLongLong(&ok);
    if (ok && epoch >= 0) seconds = epoch;
    const QByteArray stamp =
        QDateTime::fromSecsSinceEpoch(seconds, QTimeZone::utc()).toString(QStringLiteral("yyyyMMddHHmmss")).toLatin1();
    // "/CreationDate (D:YYYYMMDDHHmmSS" followed by a zone of any length.
    static const QByteArray key("/CreationDate (D:");
    for (qsizetype at = pdf.indexOf(key); at >= 0; at = pdf.indexOf(key, at + 1)) {
        const qsizetype digits = at + key.size();
        if (digits + 14 <= pdf.size()) pdf.replace(digits, 14, stamp);
        // The zone suffix: "Z", "+hh'mm'" or "-hh'mm'": write UTC the same length.
        qsizetype end = pdf.indexOf(')', digits + 14);
        if (end > digits + 14) {
            const qsizetype len = end - (digits + 14);
            QByteArray zone = len >= 7 ? QByteArray("+00'00'") : QByteArray("Z");
            zone = zone.leftJustified(len, ' ', true);
            pdf.replace(digits + 14, len, zone);
        }
    }
    // "/ID [<hex> <hex>]": a hash of the document with the ids blanked.
    static const QRegularExpression idExpr(QStringLiteral("/ID \\[\\s*<([0-9A-Fa-f]+)>\\s*<([0-9A-Fa-f]+)>\\s*\\]"));
    QString text = QString::fromLatin1(pdf);
    const auto match = idExpr.match(text);
    if (match.hasMatch()) {
        QByteArray blanked = pdf;
        const qsizetype from = match.capturedStart(0), len = match.capturedLength(0);
        blanked.replace(from, len, QByteArray(len, ' '));
        const QByteArray hex = QCryptographicHash::hash(blanked, QCryptographicHash::Sha256).toHex().toUpper();
        for (int k = 1; k <= 2; ++k) {
            const qsizetype start = match.capturedStart(k), n = match.capturedLength(k);
            QByteArray id = hex.repeated(1 + static_cast<int>(n / hex.size())).left(n);
            pdf.replace(start, n, id);
        }
    }
}

}  // namespace moderato::ui
