"""Builds the shellwright package with the project's CMake and installs it.

The extension (_engine) and the gRPC stubs (shellwright.v1) are built by
CMake (clients/python/CMakeLists.txt) into <build>/python/shellwright,
which already holds the package's modules; this script copies that tree.
<build> is $SHELLWRIGHT_BUILD_DIR, else the checkout's ./build when it is
configured (bash .ci/setup), else ./build-python, configured here with
Debian's interpreter. Only the package's target is built.

    pip install --no-build-isolation ./clients/python
"""

import os
import shutil
import subprocess
import sys

from setuptools import Distribution, setup
from setuptools.command.build_py import build_py

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))


def build_dir():
    explicit = os.environ.get("SHELLWRIGHT_BUILD_DIR")
    if explicit:
        return os.path.abspath(explicit)
    default = os.path.join(ROOT, "build")
    if os.path.exists(os.path.join(default, "CMakeCache.txt")):
        return default
    return os.path.join(ROOT, "build-python")


SCRATCH = os.path.join(build_dir(), "python-setuptools")
os.makedirs(SCRATCH, exist_ok=True)


class BuildWithCMake(build_py):
    """Builds the package's CMake target, then copies the assembled tree."""

    def run(self):
        build = build_dir()
        if not os.path.exists(os.path.join(build, "CMakeCache.txt")):
            subprocess.check_call([
                "cmake", "-S", ROOT, "-B", build, "-G", "Ninja",
                "-DCMAKE_BUILD_TYPE=Release",
                "-DSHELLWRIGHT_BUILD_TESTS=OFF",
                "-DSHELLWRIGHT_BUILD_BENCHMARKS=OFF",
                "-DSHELLWRIGHT_PYTHON=" + os.path.realpath(sys.executable)])
        subprocess.check_call(["cmake", "--build", build, "--target",
                               "shellwright_python"])
        package = os.path.join(build, "python", "shellwright")
        target = os.path.join(self.build_lib, "shellwright")
        shutil.rmtree(target, ignore_errors=True)
        shutil.copytree(package, target,
                        ignore=shutil.ignore_patterns("__pycache__"))


class BinaryDistribution(Distribution):
    def has_ext_modules(self):
        return True  # _engine: a platform wheel.


setup(
    name="shellwright",
    version="0.1.0",
    description="Electron configurations, ions, oxidation states and "
                "idealised spin states and moments, in process or from "
                "shellwrightd",
    python_requires=">=3.9",
    packages=["shellwright"],  # With shellwright.v1, built by CMake.
    # setuptools' scratch space in the build tree, not the checkout.
    options={"build": {"build_base": SCRATCH},
             "egg_info": {"egg_base": SCRATCH}},
    cmdclass={"build_py": BuildWithCMake},
    distclass=BinaryDistribution,
    zip_safe=False,
)
