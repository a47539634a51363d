"""`python -m bench [NAME ...]`: run every benchmark module (or the named ones)."""

import importlib
import sys

MODULES = ["solver_bench", "kernel_bench", "gui_bench", "sweep_bench", "file_bench",
           "untrusted_bench", "influence_bench", "path_bench", "first_fit_bench"]


def main(argv) -> int:
    names = argv or MODULES
    for name in names:
        try:
            module = importlib.import_module(f"bench.{name}")
        except ModuleNotFoundError as exc:
            if exc.name != f"bench.{name}":
                raise
            print(f"[{name}] not present, skipped")
            continue
        print(f"\n=== {name} ===", flush=True)
        module.main()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
