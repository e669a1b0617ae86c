/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/api.h - marks the functions of the public interface.
 *
 * The library is built with hidden symbol visibility: only declarations
 * marked KEEL_API in include/keel/ are exported from libkeel.so, and
 * everything else in src/ stays internal to the library.
 */
#ifndef KEEL_API_H
#define KEEL_API_H

#if defined(__GNUC__) || defined(__clang__)
#define KEEL_API __attribute__((visibility("default")))
#else
#define KEEL_API
#endif

#endif /* KEEL_API_H */
