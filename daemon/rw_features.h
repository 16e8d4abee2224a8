/* The daemon's optional parts: CMake's RW_WITH_TCP and RW_WITH_SYSTEMD
 * define these 1 or 0; a build without CMake gets everything. Shared by
 * the protocol layer (service.info's features) and the server. */
#ifndef RW_RW_FEATURES_H
#define RW_RW_FEATURES_H

#ifndef RW_WITH_TCP
#define RW_WITH_TCP 1
#endif
#ifndef RW_WITH_SYSTEMD
#define RW_WITH_SYSTEMD 1
#endif

#endif
