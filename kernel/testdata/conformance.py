"""Jupyter's own kernel conformance suite (jupyter_kernel_test) run against lsys.

Run by kernel/conformance_test.go with /usr/bin/python3 (Debian's Jupyter),
with JUPYTER_PATH pointing at a kernelspec for the freshly built binary.
Every sample family the suite offers is filled in.
"""
import unittest

import jupyter_kernel_test


class LsysKernelTests(jupyter_kernel_test.KernelTests):
    kernel_name = "lsys"
    language_name = "lsys"
    file_extension = ".lsys"

    code_hello_world = 'print("hello, world")'
    code_stderr = 'warn("this goes to stderr")'

    # text/plain of a number is its shortest decimal form.
    code_execute_result = [
        {"code": "1 + 2", "result": "3"},
        {"code": "2 * 3.5", "result": "7"},
        {"code": "system([[0, 1], [-2, -3]], [[0], [1]], [[1, 0]])", "mime": "text/html"},
    ]
    code_display_data = [
        {"code": "show(system([[0, 1], [-2, -3]], [[0], [1]], [[1, 0]]))", "mime": "text/plain"},
        {"code": "show(modes(system([[0, 1], [-2, -3]], [[0], [1]], [[1, 0]])))", "mime": "text/html"},
    ]
    code_generate_error = "undefined_name + 1"

    complete_code_samples = ["1 + 2", "k = 3", "A = [[0, 1], [-2, -3]]"]
    incomplete_code_samples = ["A = [[0, 1],", "print(1,", "x = (1 +"]
    invalid_code_samples = ["x = )", "[1, 2]]", "1 +* 2"]

    completion_samples = [{"text": "pri", "matches": {"print"}}]

    code_inspect_sample = "modes"

    code_history_pattern = "1 + *"
    supported_history_operations = ("tail", "range", "search")

    code_clear_output = "clear()"

    code_page_something = "help(modes)"


if __name__ == "__main__":
    unittest.main()
