import os

# Every test runs headless, also when started without `make test`.
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
