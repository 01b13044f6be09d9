"""The type stubs against the package: the generator functions' signatures
in `__init__.pyi` are those built from the core's catalogue (the catalogue
is the reference: `burnin generate --help` lists the same), and every public
name has a stub."""

import ast
import inspect
from pathlib import Path

import burnin

STUB = Path(burnin.__file__).with_name("__init__.pyi")


def stub_tree():
    return ast.parse(STUB.read_text())


def test_generator_stubs_match_the_catalogue():
    cls = next(n for n in stub_tree().body if isinstance(n, ast.ClassDef) and n.name == "_Generate")
    stubbed = {}
    for f in cls.body:
        if isinstance(f, ast.FunctionDef):
            args = f.args.kwonlyargs
            stubbed[f.name] = [(a.arg, ast.literal_eval(d)) for a, d in zip(args, f.args.kw_defaults)]
    built = {}
    for name, fn in vars(burnin.generate).items():
        built[name] = [(p.name, p.default) for p in inspect.signature(fn).parameters.values()]
    assert stubbed == built


def test_every_public_name_has_a_stub():
    names = set()
    for n in stub_tree().body:
        if isinstance(n, (ast.ClassDef, ast.FunctionDef)):
            names.add(n.name)
        elif isinstance(n, ast.AnnAssign):
            names.add(n.target.id)
    assert set(burnin.__all__) <= names, set(burnin.__all__) - names
