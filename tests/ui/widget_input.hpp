// Finding the widgets of a dialog or page by name and driving them with the
// keyboard, as a user would.
#pragma once

#include <gtest/gtest.h>

#include <QComboBox>
#include <QObject>
#include <QString>
#include <QTest>

namespace moderato::test {

// The child widget of type T named `name` (a test failure when there is none).
template <typename T>
T* child(const QObject* parent, const char* name) {
    T* c = parent->findChild<T*>(QString::fromLatin1(name));
    EXPECT_NE(c, nullptr) << "no child widget named " << name;
    return c;
}

// Moves a combo box to `index` with arrow keys.
inline void chooseByKeys(QComboBox* box, int index) {
    ASSERT_NE(box, nullptr);
    ASSERT_GE(index, 0);
    ASSERT_LT(index, box->count());
    box->setFocus();
    for (int guard = 0; box->currentIndex() != index && guard < 100; ++guard)
        QTest::keyClick(box, box->currentIndex() < index ? Qt::Key_Down : Qt::Key_Up);
    ASSERT_EQ(box->currentIndex(), index);
}

}  // namespace moderato::test
