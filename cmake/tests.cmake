# Test registration. Each tests/unit/test_<module>.c and
# tests/proto/test_<topic>.c is one cmocka executable and one ctest test;
# tests/e2e/test_*.py and tests/reference/test_*.py run under Debian's
# /usr/bin/python3 (they need its python3-iapws, -numpy, -scipy,
# -jsonschema).
# tests/reference/*_dump.c are small drivers that print core values for the
# Python reference checks; they may use the client library too (segy_dump
# writes SEG-Y with client/segy.c for the segyio check).
set(RW_PY /usr/bin/python3)

# Tests that need an optional part (the CMake options RW_WITH_TCP,
# RW_WITH_SYSTEMD, RW_WITH_CLIENT, RW_WITH_PLOT) are not registered in a
# build without it: "dir/name:feature feature...". Tests that only have a
# part needing one ask rwtest.built_with(), which reads RW_FEATURES.
set(RW_TEST_NEEDS
  "unit/test_las:client" "unit/test_segy:client" "unit/test_wits:client"
  "reference/test_segy_segyio:client"
  "e2e/test_plot:client plot"
  "e2e/test_hard_systemd:systemd"
  "e2e/test_call_format:client" "e2e/test_client_answers:client"
  "e2e/test_client_socket:client" "e2e/test_daemon:client"
  "e2e/test_feed:client" "e2e/test_hard_conns:client"
  "e2e/test_log_header:client" "e2e/test_log_stream:client"
  "e2e/test_log_units:client" "e2e/test_pressure_feed:client"
  "e2e/test_readme_client:client" "e2e/test_synthetic:client")
string(REPLACE ";" "," RW_FEATURES_ENV "${RW_FEATURES}")
# Sets ${out} to the feature a test `id` needs and this build lacks, or "".
function(rw_test_missing id out)
  set(miss "")
  foreach(entry ${RW_TEST_NEEDS})
    string(REGEX MATCH "^([^:]+):(.*)$" m "${entry}")
    if(CMAKE_MATCH_1 STREQUAL id)
      string(REPLACE " " ";" needs "${CMAKE_MATCH_2}")
      foreach(f ${needs})
        if(NOT f IN_LIST RW_FEATURES)
          set(miss ${f})
        endif()
      endforeach()
    endif()
  endforeach()
  set(${out} "${miss}" PARENT_SCOPE)
endfunction()

function(rw_c_tests dir)
  file(GLOB srcs CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/${dir}/test_*.c)
  foreach(src ${srcs})
    get_filename_component(name ${src} NAME_WE)
    rw_test_missing(${dir}/${name} miss)
    if(miss)
      message(STATUS "${dir}/${name}: not registered (built without ${miss})")
      continue()
    endif()
    set(exe ${dir}_${name})
    add_executable(${exe} ${src})
    target_include_directories(${exe} PRIVATE ${PROJECT_SOURCE_DIR}/tests)
    target_compile_definitions(${exe} PRIVATE
      RW_SOURCE_DIR="${PROJECT_SOURCE_DIR}")
    target_link_libraries(${exe} PRIVATE PkgConfig::CMOCKA PkgConfig::GSL rwcore)
    foreach(lib rwnum rwproto rwsrv rwcli)
      if(TARGET ${lib})
        target_link_libraries(${exe} PRIVATE ${lib})
      endif()
    endforeach()
    add_test(NAME ${dir}/${name} COMMAND ${exe})
    set_tests_properties(${dir}/${name} PROPERTIES TIMEOUT 120)
  endforeach()
endfunction()
rw_c_tests(unit)
rw_c_tests(proto)
# 10^7 random cases each against glibc: about 15 s alone, more on a busy
# machine or beside the rest of the suite.
set_tests_properties(unit/test_numfmt unit/test_numparse PROPERTIES TIMEOUT 300)
# The number library's path for compilers without 128-bit integers
# (daemon/proto/numtab.h: 64 x 64-bit products from 32-bit halves), which
# gcc and clang never take on 64-bit targets, amd64 and arm64 alike: the
# same two tests on a copy of rwnum built with __SIZEOF_INT128__
# undefined, on 10^6 random cases each.
add_library(rwnum_noint128 STATIC ${RW_NUM_SRC})
target_compile_options(rwnum_noint128 PRIVATE -U__SIZEOF_INT128__)
target_include_directories(rwnum_noint128 PUBLIC ${PROJECT_SOURCE_DIR}/daemon)
target_link_libraries(rwnum_noint128 PUBLIC m)
foreach(t numfmt numparse)
  set(exe unit_test_${t}_noint128)
  add_executable(${exe} ${PROJECT_SOURCE_DIR}/tests/unit/test_${t}.c)
  target_compile_options(${exe} PRIVATE -U__SIZEOF_INT128__)
  target_include_directories(${exe} PRIVATE ${PROJECT_SOURCE_DIR}/tests)
  target_link_libraries(${exe} PRIVATE PkgConfig::CMOCKA rwnum_noint128)
  add_test(NAME unit/test_${t}_noint128 COMMAND ${exe})
  set_tests_properties(unit/test_${t}_noint128 PROPERTIES TIMEOUT 300
                       ENVIRONMENT "RW_NUM_ITERS=1000000")
endforeach()

file(GLOB RW_DUMPS CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/reference/*_dump.c)
foreach(src ${RW_DUMPS})
  get_filename_component(name ${src} NAME_WE)
  if(name STREQUAL "segy_dump" AND NOT TARGET rwcli)
    continue() # writes SEG-Y with the client's writer
  endif()
  add_executable(${name} ${src})
  target_link_libraries(${name} PRIVATE rwcore rwnum PkgConfig::CJSON PkgConfig::GSL)
  if(TARGET rwcli)
    target_link_libraries(${name} PRIVATE rwcli)
  endif()
endforeach()

function(rw_py_tests dir)
  file(GLOB srcs CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/${dir}/test_*.py)
  foreach(src ${srcs})
    get_filename_component(name ${src} NAME_WE)
    rw_test_missing(${dir}/${name} miss)
    if(miss)
      message(STATUS "${dir}/${name}: not registered (built without ${miss})")
      continue()
    endif()
    add_test(NAME ${dir}/${name} COMMAND ${RW_PY} ${src})
    set_tests_properties(${dir}/${name} PROPERTIES TIMEOUT 300
      ENVIRONMENT "RW_BUILD=${CMAKE_BINARY_DIR};RW_SRC=${PROJECT_SOURCE_DIR};RW_FEATURES=${RW_FEATURES_ENV}")
  endforeach()
endfunction()
rw_py_tests(reference)
rw_py_tests(proto)
rw_py_tests(e2e)

# Benchmarks: tests/bench/bench_*.c are built but never run by ctest; the
# scripts beside them run them on demand and compare with numpy measured
# in the same run.
file(GLOB RW_BENCH CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/bench/bench_*.c)
foreach(src ${RW_BENCH})
  get_filename_component(name ${src} NAME_WE)
  add_executable(${name} ${src})
  target_link_libraries(${name} PRIVATE rwcore rwnum PkgConfig::CJSON PkgConfig::GSL)
endforeach()
