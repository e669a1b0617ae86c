#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""A whole house's census as one roster, for the size benchmarks of
docs/hardening.md: PATIENTS patients (acuity 1-5, every 7th needs tele),
NURSES nurses (every 3rd has tele), a limit of 6.  Invented data, seeded.

Usage: gen_house.py PATIENTS NURSES OUT.yaml
Then:  /usr/bin/time -v keel assign OUT.yaml --time-limit 2 > /dev/null
"""
import random
import sys


def main():
    patients, nurses, out = int(sys.argv[1]), int(sys.argv[2]), sys.argv[3]
    rng = random.Random(5)
    lines = ["version: 1", 'unit: {name: "House census (invented)"}',
             "shift: {minutes: 720, break_minutes: 60}",
             "policy: {max_patients: 6, acuity_minutes: {1: 60, 2: 90, 3: 135, 4: 190, 5: 270}}",
             "nurses:"]
    lines += ["  - {id: N%d%s}" % (i, ", skills: [tele]" if i % 3 == 0 else "")
              for i in range(nurses)]
    lines.append("patients:")
    lines += ['  - {id: P%d, bed: "B%d", acuity: %d%s}'
              % (i, i, rng.randint(1, 5), ", needs: [tele]" if i % 7 == 0 else "")
              for i in range(patients)]
    with open(out, "w", encoding="utf-8") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
