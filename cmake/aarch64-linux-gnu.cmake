# Cross-build for 64-bit Arm Linux with Debian's cross toolchain
# (gcc-aarch64-linux-gnu, whose C library is libc6-dev-arm64-cross under
# /usr/aarch64-linux-gnu) and Debian's arm64 packages of libuv, cJSON, GSL
# and cmocka unpacked into a private sysroot (never installed into the
# host system: some arm64 -dev packages, libgsl-dev among them, are not
# co-installable with the host's). The programs and tests run under
# qemu-aarch64 (Debian's qemu-user) as ctest's emulator.
# tests/extra/arm64 makes the sysroot and runs it all; by hand:
#   cmake -S . -B build-arm64 -DRW_WITH_PLOT=OFF \
#         -DCMAKE_TOOLCHAIN_FILE=cmake/aarch64-linux-gnu.cmake \
#         -DRW_ARM64_SYSROOT=/path/to/sysroot
set(CMAKE_SYSTEM_NAME Linux)
set(CMAKE_SYSTEM_PROCESSOR aarch64)
set(RW_TRIPLE aarch64-linux-gnu)
set(CMAKE_C_COMPILER ${RW_TRIPLE}-gcc)

# The sysroot is given once (-DRW_ARM64_SYSROOT) and passed on through the
# environment to the try-compile projects, which read this file again.
if(RW_ARM64_SYSROOT)
  set(ENV{RW_ARM64_SYSROOT} "${RW_ARM64_SYSROOT}")
elseif(DEFINED ENV{RW_ARM64_SYSROOT})
  set(RW_ARM64_SYSROOT "$ENV{RW_ARM64_SYSROOT}")
endif()
if(NOT RW_ARM64_SYSROOT OR NOT IS_DIRECTORY "${RW_ARM64_SYSROOT}/usr/lib/${RW_TRIPLE}")
  message(FATAL_ERROR "RW_ARM64_SYSROOT='${RW_ARM64_SYSROOT}' is not an arm64 "
          "sysroot (no usr/lib/${RW_TRIPLE}); tests/extra/arm64 makes one")
endif()
set(RW_ARM64_LIB "${RW_ARM64_SYSROOT}/usr/lib/${RW_TRIPLE}")

# pkg-config answers from the sysroot alone, its paths prefixed with it.
set(ENV{PKG_CONFIG_LIBDIR}
    "${RW_ARM64_LIB}/pkgconfig:${RW_ARM64_SYSROOT}/usr/share/pkgconfig")
set(ENV{PKG_CONFIG_SYSROOT_DIR} "${RW_ARM64_SYSROOT}")
set(ENV{PKG_CONFIG_PATH} "")
set(CMAKE_FIND_ROOT_PATH "${RW_ARM64_SYSROOT}" /usr/${RW_TRIPLE})
set(CMAKE_FIND_ROOT_PATH_MODE_PROGRAM NEVER)
set(CMAKE_FIND_ROOT_PATH_MODE_LIBRARY ONLY)
set(CMAKE_FIND_ROOT_PATH_MODE_INCLUDE ONLY)
set(CMAKE_LIBRARY_ARCHITECTURE ${RW_TRIPLE})
# The sysroot's libraries need one another (libgsl: libgslcblas) at link
# time; at run time the emulator below finds them.
set(CMAKE_EXE_LINKER_FLAGS_INIT "-Wl,-rpath-link,${RW_ARM64_LIB}")
set(CMAKE_SHARED_LINKER_FLAGS_INIT "-Wl,-rpath-link,${RW_ARM64_LIB}")

# qemu-aarch64 runs the cross C library's dynamic loader, which loads the
# program with that C library and the sysroot's libraries. (With qemu's -L
# prefix instead, a host that also has libc6:arm64 installed mixes that
# libc with the cross loader, through the host's ld.so.cache: a different
# build of glibc 2.36, and pthread_create then hangs.)
find_program(RW_QEMU qemu-aarch64)
set(RW_ARM64_LOADER /usr/${RW_TRIPLE}/lib/ld-linux-aarch64.so.1)
if(RW_QEMU)
  set(CMAKE_CROSSCOMPILING_EMULATOR
      ${RW_QEMU} ${RW_ARM64_LOADER}
      --library-path /usr/${RW_TRIPLE}/lib:${RW_ARM64_LIB})
endif()
