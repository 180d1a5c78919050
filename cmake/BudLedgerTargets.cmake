# Helpers that give every BudLedger target the same warnings, sanitizers and
# include layout, so folders declare only what they are made of.

function(budledger_target_defaults target)
  target_compile_features(${target} PUBLIC cxx_std_20)
  target_compile_options(${target} PRIVATE -Wall -Wextra -Wpedantic)
  if(BUDLEDGER_WERROR)
    target_compile_options(${target} PRIVATE -Werror)
  endif()
  if(BUDLEDGER_SANITIZE)
    target_compile_options(${target} PRIVATE -fsanitize=address,undefined -fno-omit-frame-pointer)
    target_link_options(${target} PUBLIC -fsanitize=address,undefined)
  endif()
endfunction()

# budledger_core_library(NAME SOURCES... [LINKS ...])
# One static library per core folder, named budledger_<folder>, with an alias
# budledger::<folder>. Core must not link Qt: this refuses any Qt target.
function(budledger_core_library name)
  cmake_parse_arguments(ARG "" "" "SOURCES;LINKS" ${ARGN})
  foreach(lib IN LISTS ARG_LINKS)
    if(lib MATCHES "^Qt")
      message(FATAL_ERROR "core/${name} may not link Qt (${lib}): core is plain C++")
    endif()
  endforeach()
  add_library(budledger_${name} STATIC ${ARG_SOURCES})
  add_library(budledger::${name} ALIAS budledger_${name})
  target_include_directories(budledger_${name} PUBLIC
    ${PROJECT_SOURCE_DIR} ${PROJECT_BINARY_DIR}/generated)
  target_link_libraries(budledger_${name} PUBLIC ${ARG_LINKS})
  budledger_target_defaults(budledger_${name})
endfunction()

# budledger_gtest(NAME SOURCES... LINKS ... [LABELS ...])
function(budledger_gtest name)
  cmake_parse_arguments(ARG "" "" "SOURCES;LINKS;LABELS" ${ARGN})
  add_executable(${name} ${ARG_SOURCES})
  target_link_libraries(${name} PRIVATE ${ARG_LINKS} GTest::gtest GTest::gtest_main)
  target_compile_definitions(${name} PRIVATE
    BUDLEDGER_SOURCE_DIR="${PROJECT_SOURCE_DIR}"
    BUDLEDGER_BINARY_DIR="${PROJECT_BINARY_DIR}")
  budledger_target_defaults(${name})
  if(NOT ARG_LABELS)
    set(ARG_LABELS core)
  endif()
  gtest_discover_tests(${name} PROPERTIES LABELS "${ARG_LABELS}" DISCOVERY_TIMEOUT 60)
endfunction()

# Adds every immediate subfolder of the current folder that has a CMakeLists.txt,
# so a new capability folder needs no edit elsewhere.
function(budledger_add_subfolders)
  file(GLOB children LIST_DIRECTORIES true RELATIVE ${CMAKE_CURRENT_SOURCE_DIR}
       ${CMAKE_CURRENT_SOURCE_DIR}/*)
  list(SORT children)
  foreach(child IN LISTS children)
    if(IS_DIRECTORY ${CMAKE_CURRENT_SOURCE_DIR}/${child}
       AND EXISTS ${CMAKE_CURRENT_SOURCE_DIR}/${child}/CMakeLists.txt)
      add_subdirectory(${child})
    endif()
  endforeach()
endfunction()
