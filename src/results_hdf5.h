/* results_hdf5.h: the HDF5 results file (private), format 1 of
 * docs/results-format.md. results_hdf5.c is the only file of the program that sees HDF5.
 */
#ifndef EF_RESULTS_HDF5_H
#define EF_RESULTS_HDF5_H

#include "results.h"

/* Version of the results-file format this program writes (root attribute format_version).
 * A reader refuses files of a newer version. */
#define EF_RESULTS_FORMAT_VERSION 1

/* Write every analysis present in r (statics, second order, modal, buckling, walking,
 * machines) and the model it refers to (r->model) to `path`.
 * The file is written as "<path>.tmp.<pid>" and renamed onto `path` only once it is
 * complete and closed; on any failure the temporary file is removed, a file already at
 * `path` is left untouched, and the message (naming the path and the HDF5 call that
 * failed) is in ctx.
 * Returns EF_OK; EF_EINPUT when a member, analysed load or machine name cannot be an
 * HDF5 link name (empty, containing '/', starting with '.', longer than 1024 bytes);
 * EF_EIO on a write failure; EF_ENOMEM.
 * Test hook: environment variable EF_TEST_FAIL_WRITE_AFTER=N makes the write fail after
 * N datasets, as a full disk would (for the tests of the atomic write only). */
ef_status ef_results_write_hdf5(const ef_results *r, const char *path, ef_ctx *ctx);

/* Read a results file back. *model receives a stub model that holds only what the file
 * records: file name, title, sha256, units, gravity direction, mesh defaults, nodes
 * (names, coordinates), members (names, end nodes, axes, length, stations, divisions,
 * releases, axial_only), supports, masses (none), load names (cases first, then
 * combinations, with names only: no node or member loads), and the name indexes.
 * Every string and array of the stub model is malloc'ed, as ef_model_free expects.
 * Materials and sections are absent (n_materials = n_sections = 0 and every member's
 * section and material are EF_NONE): do not call code that needs them (weights, the
 * model summary) with this model. *results refers to *model (results->model); its
 * walking and machine results are allocated with ef_vibration_walking_alloc and
 * ef_vibration_machine_alloc, as the analysis allocates them.
 * Both are handed over on EF_OK only; the caller frees them with ef_results_free, then
 * ef_model_free. Returns EF_EIO when the file cannot be opened or read, EF_EINPUT when
 * it is not an eigenframe results file, of a newer format_version, or inconsistent
 * (a dataset missing or of the wrong shape), EF_ENOMEM. */
ef_status ef_results_read_hdf5(const char *path, ef_model **model, ef_results **results,
                               ef_ctx *ctx);

/* Facts of a results file that are not part of the model or the results. */
typedef struct {
    int format_version;
    char program_version[64];
    char created_utc[64];
    char model_file[1024];
    char model_sha256[72];
} ef_results_file_info;

/* Read the root attributes of a results file (same refusals as ef_results_read_hdf5). */
ef_status ef_results_read_hdf5_info(const char *path, ef_results_file_info *info, ef_ctx *ctx);

#endif /* EF_RESULTS_HDF5_H */
