# The include rules of kith's layers (DEVELOPERS.md, "Layout"), checked on the source text.
#
# Each folder below solver/ and viewer/ is a layer. A file may include, by quoted path, only
# what its layer's KITH_MAY_INCLUDE_<layer> list allows: whole layers ("solver/io") or single
# headers ("solver/live/commands.h"), and no system header its KITH_MAY_NOT_USE_<layer> list
# names (e.g. no ImGui in the solver). A source file directly in solver/ or viewer/, a quoted
# include of a file that does not exist, and a folder with no rule are problems too.
#
# Used two ways:
#   include() it and call kith_check_includes(ROOT OUT_VAR): OUT_VAR gets one line per problem,
#     "FILE:LINE: RULE" (the top-level CMakeLists.txt stops the configure on any);
#   cmake -DKITH_ROOT=DIR -P scripts/check_includes.cmake: prints the problems, fails if any
#     (tests/test_layout_rules.cpp plants a forbidden include in a copy and checks it is caught).

set(kith_solver_order base io features objective fit measures asking live)
set(kith_acc "")
foreach(layer ${kith_solver_order})
  list(APPEND kith_acc solver/${layer})
  set(KITH_MAY_INCLUDE_solver/${layer} ${kith_acc})
endforeach()
set(KITH_MAY_INCLUDE_solver/session solver/base solver/io solver/session)
set(KITH_MAY_INCLUDE_solver/demo ${kith_acc} solver/demo)

# The window's side sees the engine through its commands and snapshots only.
set(kith_scene_view solver/base solver/io solver/features solver/objective solver/fit solver/measures solver/asking
    solver/live/commands.h solver/live/snapshot.h)
set(KITH_MAY_INCLUDE_viewer/scene ${kith_scene_view} viewer/scene)
set(KITH_MAY_INCLUDE_viewer/gl ${kith_scene_view} viewer/scene viewer/gl)
set(KITH_MAY_INCLUDE_viewer/panels ${kith_scene_view} viewer/scene viewer/panels)
set(KITH_MAY_INCLUDE_viewer/session ${kith_scene_view} solver/session viewer/scene viewer/session)
set(KITH_MAY_INCLUDE_viewer/window solver viewer/scene viewer/gl viewer/panels viewer/session viewer/window)
set(KITH_MAY_INCLUDE_viewer/cli solver viewer)

set(kith_gui_headers "GLFW/" "imgui" "backends/" "epoxy/" "EGL/" "GL/")
foreach(layer ${kith_solver_order} demo)
  set(KITH_MAY_NOT_USE_solver/${layer} ${kith_gui_headers} "glm/" "sqlite3.h")
endforeach()
set(KITH_MAY_NOT_USE_solver/session ${kith_gui_headers} "glm/")
set(KITH_MAY_NOT_USE_viewer/scene ${kith_gui_headers} "sqlite3.h")
set(KITH_MAY_NOT_USE_viewer/gl "GLFW/" "imgui" "backends/" "sqlite3.h")
set(KITH_MAY_NOT_USE_viewer/panels "GLFW/" "backends/" "EGL/" "sqlite3.h")
set(KITH_MAY_NOT_USE_viewer/session ${kith_gui_headers} "sqlite3.h")
set(KITH_MAY_NOT_USE_viewer/window "sqlite3.h")
set(KITH_MAY_NOT_USE_viewer/cli "sqlite3.h")

function(kith_check_includes root out_var)
  set(problems "")
  file(GLOB_RECURSE files RELATIVE ${root} ${root}/solver/*.h ${root}/solver/*.cpp ${root}/viewer/*.h ${root}/viewer/*.cpp)
  foreach(file ${files})
    if(NOT file MATCHES "^(solver|viewer)/([a-z_]+)/[^/]+$")
      list(APPEND problems "${file}:1: a source file belongs in a layer folder (solver/LAYER/ or viewer/LAYER/)")
      continue()
    endif()
    set(layer "${CMAKE_MATCH_1}/${CMAKE_MATCH_2}")
    if(NOT DEFINED KITH_MAY_INCLUDE_${layer})
      list(APPEND problems "${file}:1: '${layer}' has no include rule in scripts/check_includes.cmake")
      continue()
    endif()
    file(STRINGS ${root}/${file} lines)
    set(number 0)
    foreach(line IN LISTS lines)
      math(EXPR number "${number} + 1")
      if(NOT line MATCHES "^[ \t]*#[ \t]*include[ \t]*([<\"])([^>\"]+)[>\"]")
        continue()
      endif()
      set(kind "${CMAKE_MATCH_1}")
      set(path "${CMAKE_MATCH_2}")
      if(kind STREQUAL "<")
        foreach(banned ${KITH_MAY_NOT_USE_${layer}})
          string(FIND "${path}" "${banned}" at)
          if(at EQUAL 0)
            list(APPEND problems "${file}:${number}: ${layer} may not use <${path}>")
          endif()
        endforeach()
        continue()
      endif()
      if(NOT path MATCHES "^(solver|viewer)/")
        continue()  # a quoted third-party header
      endif()
      if(NOT EXISTS ${root}/${path})
        list(APPEND problems "${file}:${number}: includes \"${path}\", which does not exist")
        continue()
      endif()
      set(allowed FALSE)
      foreach(prefix ${KITH_MAY_INCLUDE_${layer}})
        if(path STREQUAL prefix OR path MATCHES "^${prefix}/")
          set(allowed TRUE)
          break()
        endif()
      endforeach()
      if(NOT allowed)
        list(APPEND problems "${file}:${number}: ${layer} may not include \"${path}\"")
      endif()
    endforeach()
  endforeach()
  set(${out_var} "${problems}" PARENT_SCOPE)
endfunction()

if(CMAKE_SCRIPT_MODE_FILE STREQUAL CMAKE_CURRENT_LIST_FILE)
  if(NOT KITH_ROOT)
    message(FATAL_ERROR "usage: cmake -DKITH_ROOT=DIR -P scripts/check_includes.cmake")
  endif()
  kith_check_includes(${KITH_ROOT} problems)
  if(problems)
    string(REPLACE ";" "\n  " problems "${problems}")
    message(FATAL_ERROR "include rules broken:\n  ${problems}")
  endif()
  message(STATUS "include rules hold")
endif()
