# Test registration. Each tests/unit/test_<module>.c and
# tests/proto/test_<topic>.c is one cmocka executable and one ctest test;
# tests/e2e/test_*.py and tests/reference/test_*.py run under Debian's
# /usr/bin/python3 (they need its python3-iapws, -numpy, -jsonschema).
# tests/reference/*_dump.c are small drivers that print core values for the
# Python reference checks.
set(RW_PY /usr/bin/python3)

function(rw_c_tests dir)
  file(GLOB srcs CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/${dir}/test_*.c)
  foreach(src ${srcs})
    get_filename_component(name ${src} NAME_WE)
    set(exe ${dir}_${name})
    add_executable(${exe} ${src})
    target_include_directories(${exe} PRIVATE ${PROJECT_SOURCE_DIR}/tests)
    target_link_libraries(${exe} PRIVATE PkgConfig::CMOCKA rwcore)
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

file(GLOB RW_DUMPS CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/reference/*_dump.c)
foreach(src ${RW_DUMPS})
  get_filename_component(name ${src} NAME_WE)
  add_executable(${name} ${src})
  target_link_libraries(${name} PRIVATE rwcore rwnum)
endforeach()

function(rw_py_tests dir)
  file(GLOB srcs CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/tests/${dir}/test_*.py)
  foreach(src ${srcs})
    get_filename_component(name ${src} NAME_WE)
    add_test(NAME ${dir}/${name} COMMAND ${RW_PY} ${src})
    set_tests_properties(${dir}/${name} PROPERTIES TIMEOUT 300
      ENVIRONMENT "RW_BUILD=${CMAKE_BINARY_DIR};RW_SRC=${PROJECT_SOURCE_DIR}")
  endforeach()
endfunction()
rw_py_tests(reference)
rw_py_tests(e2e)
