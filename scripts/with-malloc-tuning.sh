#!/usr/bin/env bash
# with-malloc-tuning.sh COMMAND...: runs COMMAND (exec, same pid) with glibc's
# malloc told to give every block of 1 MiB or more its own mapping, returned to
# the system when freed. The one home of this setting: the worker, `npm run
# reduce`, the benchmarks and the tests that measure a reduction's memory all
# start through here.
#
# Why: glibc raises its mapping threshold to the size of each large block freed
# (up to 32 MiB), so a reduction's bands, registration images and row buffers
# (1 to 32 MiB, made and freed frame after frame on several threads) land in its
# heaps and arenas, which it rarely gives back. Measured on the scale bench's
# ladder at 1500 x 1000 (high-water mark, 9 and 81 frames): 519 and 610 MiB as
# glibc comes, 446 and 468 MiB with this setting, for the same time within this
# machine's spread (67.4 and 70.2 s at 81 frames). A fixed threshold also ends
# the raising. Other C libraries ignore the variable.
export MALLOC_MMAP_THRESHOLD_="${MALLOC_MMAP_THRESHOLD_:-1048576}"
exec "$@"
