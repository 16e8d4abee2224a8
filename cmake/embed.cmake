# Turns a file into a C source defining `const char NAME[]` (NUL-terminated)
# and `const size_t NAME_len`. Run as a script:
#   cmake -DIN=file -DOUT=file.c -DNAME=sym -P embed.cmake
if(NOT DEFINED IN OR NOT DEFINED OUT OR NOT DEFINED NAME)
  message(FATAL_ERROR "embed.cmake: IN, OUT and NAME are required")
endif()
file(READ "${IN}" hex HEX)
string(LENGTH "${hex}" hexlen)
math(EXPR len "${hexlen} / 2")
string(REGEX REPLACE "([0-9a-f][0-9a-f])" "0x\\1," body "${hex}")
string(REGEX REPLACE "(0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,)" "\\1\n" body "${body}")
file(WRITE "${OUT}" "/* Generated from ${NAME} at build time; do not edit. */\n#include <stddef.h>\nconst char ${NAME}[] = {\n${body}0x00};\nconst size_t ${NAME}_len = ${len};\n")
