/* The monitor tests' rig (monitor.c, soak.c): the text of tests/data/monitor-rig.toml, which the
 * Python tests and the Rust bench read. */
#ifndef STILLSKY_TEST_MONITOR_RIG_H
#define STILLSKY_TEST_MONITOR_RIG_H

/* A 20 kg tube on horizontal springs at two heights: ground x and y rock it about y and x
 * (invented test rig). */
static const char MODEL[] =
    "[[body]]\nname = \"tube\"\nmass_kg = 20\ncg_m = [0, 0, 1]\ninertia_kgm2 = [2, 2, 2]\n"
    "dofs = [\"x\", \"y\", \"rx\", \"ry\"]\n"
    "[[spring]]\nname = \"xl\"\nfrom = \"ground\"\nto = \"tube\"\nat_m = [0, 0, 0.6]\ndirection = [1, 0, 0]\n"
    "stiffness_n_per_m = 1e5\nloss_factor = 0.1\n"
    "[[spring]]\nname = \"xh\"\nfrom = \"ground\"\nto = \"tube\"\nat_m = [0, 0, 1.2]\ndirection = [1, 0, 0]\n"
    "stiffness_n_per_m = 5e4\nloss_factor = 0.1\n"
    "[[spring]]\nname = \"yl\"\nfrom = \"ground\"\nto = \"tube\"\nat_m = [0, 0, 0.6]\ndirection = [0, 1, 0]\n"
    "stiffness_n_per_m = 1.2e5\nloss_factor = 0.1\n"
    "[[spring]]\nname = \"yh\"\nfrom = \"ground\"\nto = \"tube\"\nat_m = [0, 0, 1.2]\ndirection = [0, 1, 0]\n"
    "stiffness_n_per_m = 4e4\nloss_factor = 0.1\n"
    "[optics]\nbody = \"tube\"\nfocal_length_mm = 1000\npixel_um = 3.76\naltitude_deg = 45\nazimuth_deg = 30\n";

#endif
