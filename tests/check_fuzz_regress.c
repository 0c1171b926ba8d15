/* check_fuzz_regress.c - replays every input the fuzzers found (and the
 * seed corpora) through the same entry points the libFuzzer harnesses
 * use (tests/fuzz/fuzz_*.c), compiled here with the ordinary compiler.
 *
 * An entry point abort()s when a reader breaks its contract (crash, a
 * message that is empty or more than one line, a success with
 * non-finite values; see tests/fuzz/fuzz.h), which Check reports as an
 * error of the test.  Each directory tests/fuzz/regress/NAME/ holds the
 * inputs that once broke reader NAME, with a note of what they broke in
 * tests/fuzz/regress/README. */
#include "config.h"
#include "fuzz.h"
#include "testutil.h"

#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char *srcdir(void)
{
    const char *s = getenv("SYNODIC_SRCDIR");
    return s && *s ? s : ".";
}

/* Feed every regular file of tests/fuzz/KIND/NAME to fn; the count. */
static size_t replay(const char *kind, const char *name,
                     int (*fn)(const uint8_t *, size_t))
{
    char dir[1024];
    snprintf(dir, sizeof dir, "%s/tests/fuzz/%s/%s", srcdir(), kind, name);
    DIR *d = opendir(dir);
    if (!d)
        return 0;
    size_t n = 0;
    struct dirent *de;
    while ((de = readdir(d))) {
        if (de->d_name[0] == '.')
            continue;
        char path[2048];
        snprintf(path, sizeof path, "%s/%s", dir, de->d_name);
        FILE *f = fopen(path, "rb");
        ck_assert_msg(f != NULL, "cannot open %s", path);
        uint8_t *buf = NULL;
        size_t len = 0, cap = 0;
        for (;;) {
            if (len == cap) {
                cap = cap ? 2 * cap : 4096;
                buf = realloc(buf, cap);
                ck_assert_ptr_nonnull(buf);
            }
            size_t got = fread(buf + len, 1, cap - len, f);
            if (got == 0)
                break;
            len += got;
        }
        fclose(f);
        fn(buf, len);
        free(buf);
        n++;
    }
    closedir(d);
    return n;
}

/* The seed corpus must be there (else the replay proves nothing); the
 * regression directory may be empty for a reader the fuzzer never broke. */
static void replay_all(const char *name, int (*fn)(const uint8_t *, size_t))
{
    size_t nc = replay("corpus", name, fn);
    size_t nr = replay("regress", name, fn);
    ck_assert_msg(nc > 0, "no seed corpus for %s under %s/tests/fuzz/corpus",
                  name, srcdir());
    fprintf(stderr, "fuzz replay %s: %zu seeds, %zu regressions\n", name, nc,
            nr);
}

START_TEST(test_study) { replay_all("study", sy_fuzz_study); }
END_TEST
START_TEST(test_bodies) { replay_all("bodies", sy_fuzz_bodies); }
END_TEST
START_TEST(test_date) { replay_all("date", sy_fuzz_date); }
END_TEST
START_TEST(test_lvcap) { replay_all("lvcap", sy_fuzz_lvcap); }
END_TEST

int main(void)
{
    Suite *s = suite_create("fuzz regressions");
    TCase *tc = tcase_create("replay");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, test_study);
    tcase_add_test(tc, test_bodies);
    tcase_add_test(tc, test_date);
    tcase_add_test(tc, test_lvcap);
    suite_add_tcase(s, tc);
    return tu_run(s);
}
