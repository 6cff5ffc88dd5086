# Install rules and the Debian package (CPack).
#
#   cmake --install build --prefix /some/where     # the application files only
#   cd build && cpack -G DEB                        # moderato_<version>_<arch>.deb
#
# Everything the application needs is in the install component "moderato";
# the package holds that component and nothing else (no tests, no static
# libraries, no headers).

include(GNUInstallDirs)

# The desktop identity (reverse-DNS form). Provisional: the project owns no
# domain, so the id sits under the reserved ".invalid" top-level domain
# (RFC 2606), which nobody can register. See DEVELOPERS.md.
set(MODERATO_APP_ID "invalid.moderato.Moderato")
set(MODERATO_DESKTOP_DIR "${PROJECT_SOURCE_DIR}/resources/desktop")
set(MODERATO_DOC_DIR "${CMAKE_INSTALL_DATAROOTDIR}/doc/moderato")

install(TARGETS moderato-cli RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR} COMPONENT moderato)

if(TARGET moderato)
  # Wayland and X11 match the window to its .desktop file by this name.
  target_compile_definitions(moderato PRIVATE MODERATO_APP_ID="${MODERATO_APP_ID}")
  install(TARGETS moderato RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR} COMPONENT moderato)
  install(FILES ${MODERATO_DESKTOP_DIR}/${MODERATO_APP_ID}.desktop
          DESTINATION ${CMAKE_INSTALL_DATAROOTDIR}/applications COMPONENT moderato)
  install(FILES ${PROJECT_SOURCE_DIR}/resources/moderato.svg
          DESTINATION ${CMAKE_INSTALL_DATAROOTDIR}/icons/hicolor/scalable/apps
          RENAME ${MODERATO_APP_ID}.svg COMPONENT moderato)
  install(FILES ${MODERATO_DESKTOP_DIR}/moderato.xml
          DESTINATION ${CMAKE_INSTALL_DATAROOTDIR}/mime/packages COMPONENT moderato)
  install(FILES ${MODERATO_DESKTOP_DIR}/${MODERATO_APP_ID}.metainfo.xml
          DESTINATION ${CMAKE_INSTALL_DATAROOTDIR}/metainfo COMPONENT moderato)
endif()

install(FILES ${PROJECT_SOURCE_DIR}/README.md ${PROJECT_SOURCE_DIR}/LICENSE ${MODERATO_DESKTOP_DIR}/copyright
        DESTINATION ${MODERATO_DOC_DIR} COMPONENT moderato)
# The sample projects with their data (not the generator script).
install(DIRECTORY ${PROJECT_SOURCE_DIR}/sample-projects/
        DESTINATION ${CMAKE_INSTALL_DATAROOTDIR}/moderato/sample-projects COMPONENT moderato
        FILES_MATCHING PATTERN "*.moderato" PATTERN "*.csv"
        PATTERN "__pycache__" EXCLUDE)

# ---------------------------------------------------------------- CPack: DEB
set(CPACK_GENERATOR "DEB")
set(CPACK_PACKAGE_NAME "moderato")
set(CPACK_PACKAGE_VENDOR "Moderato developers")
set(CPACK_PACKAGE_CONTACT "Moderato developers <dev@moderato.invalid>")
set(CPACK_PACKAGE_VERSION "${PROJECT_VERSION}")
set(CPACK_PACKAGE_DESCRIPTION_SUMMARY "workbench for moderated effects in regression")
# Wrapped for the Debian control file (lines under 80 columns).
string(CONCAT CPACK_PACKAGE_DESCRIPTION
  "Moderato fits regressions with interaction terms and shows how the effect\n"
  "of a focal predictor depends on a moderator: conditional effects with\n"
  "classical, robust or cluster-robust standard errors, the moderator range\n"
  "where the effect differs from zero (Johnson-Neyman), crossover points,\n"
  "logistic, probit and count models on the outcome's own scale, model\n"
  "checks and figures for memos. The package holds the Qt workbench\n"
  "(moderato), the command-line program (moderato-cli) and eight sample\n"
  "projects.")
set(CPACK_RESOURCE_FILE_LICENSE "${PROJECT_SOURCE_DIR}/LICENSE")
set(CPACK_STRIP_FILES ON)

# One package made of the application component only.
set(CPACK_COMPONENTS_ALL moderato)
set(CPACK_DEB_COMPONENT_INSTALL ON)
set(CPACK_COMPONENTS_GROUPING ALL_COMPONENTS_IN_ONE)

set(CPACK_DEBIAN_PACKAGE_NAME "moderato")
set(CPACK_DEBIAN_FILE_NAME DEB-DEFAULT)
set(CPACK_DEBIAN_PACKAGE_MAINTAINER "Moderato developers <dev@moderato.invalid>")
set(CPACK_DEBIAN_PACKAGE_SECTION "science")
set(CPACK_DEBIAN_PACKAGE_PRIORITY "optional")
# dpkg-shlibdeps computes Depends from the linked libraries (Qt 6, QCustomPlot, libstdc++).
set(CPACK_DEBIAN_PACKAGE_SHLIBDEPS ON)
# Figures are set in DejaVu Sans by default.
set(CPACK_DEBIAN_PACKAGE_RECOMMENDS "fonts-dejavu-core")

include(CPack)
