# `cmake --install build --prefix PREFIX` puts under PREFIX:
#   bin/                     shellwright, shellwrightd
#   libexec/shellwright/     shellwright-remote, the CLI with the gRPC
#                            client that `shellwright --server` runs
#   lib/                     the engine's static libraries
#   include/engine, util     the engine's public headers (and the util
#                            headers they include)
#   lib/cmake/Shellwright/   ShellwrightConfig.cmake: Shellwright::engine
#   share/shellwright/data   the TSV tables the engine is compiled from
#                            (the engine reads no files; they are its
#                            sources, with their references)
#   share/shellwright/proto  the shellwright.v1 API, for clients
# tests/install/ builds a consumer against such a prefix.

include(GNUInstallDirs)
include(CMakePackageConfigHelpers)

install(TARGETS shellwright shellwrightd
  RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
# Where clients/CMakeLists.txt tells shellwright to look for its twin.
install(TARGETS shellwright_remote
  RUNTIME DESTINATION ${SHELLWRIGHT_REMOTE_CLI_DIR})

set_target_properties(shellwright_engine PROPERTIES EXPORT_NAME engine)
set_target_properties(shellwright_notation PROPERTIES EXPORT_NAME notation)
set_target_properties(shellwright_text PROPERTIES EXPORT_NAME text)
install(TARGETS shellwright_engine shellwright_notation shellwright_text
  EXPORT ShellwrightTargets
  ARCHIVE DESTINATION ${CMAKE_INSTALL_LIBDIR}
  INCLUDES DESTINATION ${CMAKE_INSTALL_INCLUDEDIR})

# Public headers only: engine/internal stays private.
file(GLOB engine_headers ${PROJECT_SOURCE_DIR}/engine/*.h)
install(FILES ${engine_headers}
  DESTINATION ${CMAKE_INSTALL_INCLUDEDIR}/engine)
install(FILES ${PROJECT_SOURCE_DIR}/util/enum_names.h
  ${PROJECT_SOURCE_DIR}/util/utf8.h
  DESTINATION ${CMAKE_INSTALL_INCLUDEDIR}/util)

file(GLOB tables ${PROJECT_SOURCE_DIR}/data/*.tsv)
install(FILES ${tables} DESTINATION ${CMAKE_INSTALL_DATADIR}/shellwright/data)
install(DIRECTORY ${PROJECT_SOURCE_DIR}/proto/shellwright
  DESTINATION ${CMAKE_INSTALL_DATADIR}/shellwright/proto
  FILES_MATCHING PATTERN "*.proto")

set(config_dir ${CMAKE_INSTALL_LIBDIR}/cmake/Shellwright)
install(EXPORT ShellwrightTargets NAMESPACE Shellwright::
  DESTINATION ${config_dir})
configure_package_config_file(${PROJECT_SOURCE_DIR}/cmake/ShellwrightConfig.cmake.in
  ${PROJECT_BINARY_DIR}/ShellwrightConfig.cmake
  INSTALL_DESTINATION ${config_dir})
write_basic_package_version_file(
  ${PROJECT_BINARY_DIR}/ShellwrightConfigVersion.cmake
  COMPATIBILITY SameMinorVersion)
install(FILES ${PROJECT_BINARY_DIR}/ShellwrightConfig.cmake
  ${PROJECT_BINARY_DIR}/ShellwrightConfigVersion.cmake
  DESTINATION ${config_dir})
