/* Writing files (src/outfile.c): atomic replacement, new files that replace
** nothing, devices and FIFOs, long names, and confinement below a root that symlinked folders cannot break. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "ug.h"
#include "check_run.h"

static char dir[64];

static void make_dir(void)
{
    snprintf(dir, sizeof dir, "/tmp/ug-outfile-XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(dir));
}

static void remove_dir(void)
{
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    ck_assert_int_eq(system(cmd), 0);
}

/* name inside dir; two buffers in turn, so a call may take two of these. */
static char *in_dir(const char *name)
{
    static char path[2][4200];
    static int turn;
    turn = !turn;
    snprintf(path[turn], sizeof path[turn], "%s/%s", dir, name);
    return path[turn];
}

static void read_back(const char *path, char *got, size_t size)
{
    memset(got, 0, size);
    FILE *f = fopen(path, "r");
    ck_assert_ptr_nonnull(f);
    ck_assert(fread(got, 1, size - 1, f) > 0);
    fclose(f);
}

/* Only the names given (sorted) are in the folder: no temporary left. */
static void assert_only(const char *want)
{
    char cmd[256], got[512] = {0};
    snprintf(cmd, sizeof cmd, "ls -A '%s' | tr '\\n' ' '", dir);
    FILE *p = popen(cmd, "r");
    ck_assert_ptr_nonnull(p);
    size_t n = fread(got, 1, sizeof got - 1, p);
    pclose(p);
    got[n] = '\0';
    ck_assert_str_eq(got, want);
}

START_TEST(test_replaces_whole_file)
{
    make_dir();
    char got[16];
    ug_error err = {0};
    ck_assert_int_eq(ug_write_file_atomic(in_dir("out.svg"), "old", 3, &err), UG_OK);
    ck_assert_int_eq(link(in_dir("out.svg"), in_dir("keep.svg")), 0);
    ck_assert_int_eq(ug_write_file_atomic(in_dir("out.svg"), "newer", 5, &err), UG_OK);
    read_back(in_dir("out.svg"), got, sizeof got);
    ck_assert_str_eq(got, "newer");
    read_back(in_dir("keep.svg"), got, sizeof got); /* replaced, not rewritten */
    ck_assert_str_eq(got, "old");
    ck_assert_int_eq(ug_write_file_atomic(in_dir("missing/out.svg"), "x", 1, &err), UG_EIO);
    ck_assert_ptr_nonnull(strstr(err.msg, "cannot create output"));
    assert_only("keep.svg out.svg ");
    remove_dir();
}
END_TEST

/* NAME_MAX is 255 on Linux file systems: a temporary named after the target
** (target + a suffix) would not fit beside a 250-character name. */
START_TEST(test_long_name)
{
    make_dir();
    char name[256];
    memset(name, 'n', 250);
    strcpy(name + 250, ".svg");
    ug_error err = {0};
    ck_assert_msg(ug_write_file_atomic(in_dir(name), "x", 1, &err) == UG_OK, "%s", err.msg);
    char want[300];
    snprintf(want, sizeof want, "%s ", name);
    assert_only(want);
    remove_dir();
}
END_TEST

START_TEST(test_fifo_without_reader_is_refused_at_once)
{
    make_dir();
    ck_assert_int_eq(mkfifo(in_dir("pipe"), 0600), 0);
    ck_assert_int_eq(symlink("pipe", in_dir("link")), 0);
    ug_error err = {0};
    alarm(5); /* a regression blocks in open(2): fail instead of hanging */
    ck_assert_int_eq(ug_write_file_atomic(in_dir("pipe"), "x", 1, &err), UG_EIO);
    ck_assert_ptr_nonnull(strstr(err.msg, "nothing is reading"));
    ck_assert_int_eq(ug_write_file_atomic(in_dir("link"), "x", 1, &err), UG_EIO);
    alarm(0);
    struct stat sb;
    ck_assert_int_eq(lstat(in_dir("pipe"), &sb), 0);
    ck_assert(S_ISFIFO(sb.st_mode));
    remove_dir();
}
END_TEST

START_TEST(test_fifo_with_reader_gets_the_bytes)
{
    make_dir();
    ck_assert_int_eq(mkfifo(in_dir("pipe"), 0600), 0);
    int rd = open(in_dir("pipe"), O_RDONLY | O_NONBLOCK);
    ck_assert_int_ge(rd, 0);
    ug_error err = {0};
    ck_assert_int_eq(ug_write_file_atomic(in_dir("pipe"), "bytes", 5, &err), UG_OK);
    char got[8] = {0};
    ck_assert_int_eq(read(rd, got, sizeof got), 5);
    ck_assert_str_eq(got, "bytes");
    close(rd);
    remove_dir();
}
END_TEST

START_TEST(test_device_written_in_place)
{
    ug_error err = {0};
    ck_assert_int_eq(ug_write_file_atomic("/dev/null", "x", 1, &err), UG_OK);
    struct stat sb;
    ck_assert_int_eq(stat("/dev/null", &sb), 0);
    ck_assert(S_ISCHR(sb.st_mode));
    ck_assert_int_eq(ug_write_file_atomic("/dev/full", "x", 1, &err), UG_EIO);
}
END_TEST

START_TEST(test_beneath_makes_folders)
{
    make_dir();
    ug_error err = {0};
    ck_assert_int_eq(ug_write_file_beneath(dir, "a/b/c.svg", "abc", 3, 1, &err), UG_OK);
    char got[8];
    read_back(in_dir("a/b/c.svg"), got, sizeof got);
    ck_assert_str_eq(got, "abc");
    remove_dir();
}
END_TEST

/* The defect this guards: out/north a symlink to a folder outside let a batch
** write there. Every folder below the root, and the last name, are checked. */
START_TEST(test_beneath_never_follows_a_folder_link)
{
    make_dir();
    ck_assert_int_eq(mkdir(in_dir("outside"), 0700), 0);
    ck_assert_int_eq(mkdir(in_dir("root"), 0700), 0);
    ck_assert_int_eq(symlink("../outside", in_dir("root/north")), 0);
    char root[128];
    snprintf(root, sizeof root, "%s/root", dir);
    ug_error err = {0};
    ck_assert_int_eq(ug_write_file_beneath(root, "north/chart.svg", "x", 1, 1, &err), UG_EIO);
    ck_assert_ptr_nonnull(strstr(err.msg, "symbolic link"));
    ck_assert_int_eq(ug_write_file_beneath(root, "north/deeper/c.svg", "x", 1, 1, &err),
                     UG_EIO);
    ck_assert_int_eq(ug_write_file_beneath(root, "../outside/c.svg", "x", 1, 1, &err),
                     UG_EIO);
    ck_assert_int_eq(ug_write_file_beneath(root, "a/../../outside/c.svg", "x", 1, 1, &err),
                     UG_EIO);
    struct stat sb;
    ck_assert_int_ne(stat(in_dir("outside/chart.svg"), &sb), 0);
    ck_assert_int_ne(stat(in_dir("outside/c.svg"), &sb), 0);
    ck_assert_int_ne(stat(in_dir("outside/deeper"), &sb), 0);
    /* a symlink as the last name is replaced, not written through */
    ck_assert_int_eq(symlink("../outside/victim.svg", in_dir("root/last.svg")), 0);
    ck_assert_int_eq(ug_write_file_beneath(root, "last.svg", "x", 1, 1, &err), UG_OK);
    ck_assert_int_ne(stat(in_dir("outside/victim.svg"), &sb), 0);
    ck_assert_int_eq(lstat(in_dir("root/last.svg"), &sb), 0);
    ck_assert(S_ISREG(sb.st_mode));
    remove_dir();
}
END_TEST

START_TEST(test_open_beneath_refuses_links_on_the_way)
{
    make_dir();
    ck_assert_int_eq(mkdir(in_dir("a"), 0700), 0);
    ck_assert_int_eq(symlink("a", in_dir("b")), 0);
    FILE *f = fopen(in_dir("a/g.svg"), "w");
    ck_assert_ptr_nonnull(f);
    fclose(f);
    int root = open(dir, O_RDONLY | O_DIRECTORY);
    int fd = ug_open_beneath(root, "a/g.svg", O_RDONLY, false);
    ck_assert_int_ge(fd, 0);
    close(fd);
    errno = 0;
    ck_assert_int_eq(ug_open_beneath(root, "b/g.svg", O_RDONLY, false), -1);
    ck_assert(errno == ELOOP || errno == ENOTDIR);
    ck_assert_int_eq(ug_open_beneath(root, "b", O_RDONLY, false), -1);
    ck_assert_int_eq(errno, ELOOP);
    ck_assert_int_eq(ug_open_beneath(root, "a/../a/g.svg", O_RDONLY, false), -1);
    close(root);
    remove_dir();
}
END_TEST

static void remove_and_die(int sig)
{
    ug_remove_partial_outputs();
    _exit(128 + sig);
}

static bool has_temporary(void)
{
    char cmd[160];
    snprintf(cmd, sizeof cmd, "ls -A '%s' | grep -q unitgram-tmp", dir);
    return system(cmd) == 0;
}

/* A child writes big files over and over; it is stopped by SIGTERM while a
** temporary is in flight, and its handler must leave none behind. */
START_TEST(test_signal_handler_removes_temporaries)
{
    make_dir();
    pid_t child = fork();
    if (child == 0) {
        signal(SIGTERM, remove_and_die);
        size_t n = 32u << 20;
        char *big = calloc(1, n);
        ug_error err = {0};
        for (int i = 0; big && i < 1000; i++)
            ug_write_file_atomic(in_dir("big.svg"), big, n, &err);
        _exit(0);
    }
    bool seen = false;
    for (int tries = 0; !seen && tries < 20000; tries++)
        seen = has_temporary();
    ck_assert_msg(seen, "the child never had a temporary file in flight");
    kill(child, SIGTERM);
    int status = 0;
    waitpid(child, &status, 0);
    ck_assert(WIFEXITED(status) && WEXITSTATUS(status) == 128 + SIGTERM);
    ck_assert_msg(!has_temporary(), "a temporary file was left behind");
    remove_dir();
}
END_TEST

/* A new file replaces nothing: a file, a dangling symlink and a FIFO at the
** name all stay as they were, the caller learns something was there, and no
** temporary is left. */
START_TEST(test_new_file_replaces_nothing)
{
    make_dir();
    ug_error err = {0};
    int existed = -1;
    char got[16];
    ck_assert_int_eq(ug_write_file_new(in_dir("new.yaml"), "new", 3, &existed, &err), UG_OK);
    ck_assert_int_eq(existed, 0);
    read_back(in_dir("new.yaml"), got, sizeof got);
    ck_assert_str_eq(got, "new");
    ck_assert_int_eq(ug_write_file_new(in_dir("new.yaml"), "other", 5, &existed, &err),
                     UG_EIO);
    ck_assert_int_eq(existed, 1);
    read_back(in_dir("new.yaml"), got, sizeof got);
    ck_assert_str_eq(got, "new");
    ck_assert_int_eq(symlink("nowhere.yaml", in_dir("dangling.yaml")), 0);
    existed = 0;
    ck_assert_int_eq(ug_write_file_new(in_dir("dangling.yaml"), "x", 1, &existed, &err),
                     UG_EIO);
    ck_assert_int_eq(existed, 1);
    ck_assert_int_eq(mkfifo(in_dir("pipe"), 0600), 0);
    alarm(5); /* a regression blocks on the FIFO: fail instead of hanging */
    existed = 0;
    ck_assert_int_eq(ug_write_file_new(in_dir("pipe"), "x", 1, &existed, &err), UG_EIO);
    alarm(0);
    ck_assert_int_eq(existed, 1);
    assert_only("dangling.yaml new.yaml pipe ");
    remove_dir();
}
END_TEST

static Suite *outfile_suite(void)
{
    Suite *s = suite_create("outfile");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_replaces_whole_file);
    tcase_add_test(tc, test_long_name);
    tcase_add_test(tc, test_fifo_without_reader_is_refused_at_once);
    tcase_add_test(tc, test_fifo_with_reader_gets_the_bytes);
    tcase_add_test(tc, test_device_written_in_place);
    tcase_add_test(tc, test_beneath_makes_folders);
    tcase_add_test(tc, test_beneath_never_follows_a_folder_link);
    tcase_add_test(tc, test_open_beneath_refuses_links_on_the_way);
    tcase_add_test(tc, test_new_file_replaces_nothing);
    tcase_add_test(tc, test_signal_handler_removes_temporaries);
    tcase_set_timeout(tc, 60);
    suite_add_tcase(s, tc);
    return s;
}

int main(void) { return check_run(outfile_suite()); }
