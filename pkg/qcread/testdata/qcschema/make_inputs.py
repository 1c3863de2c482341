# Writes, from <mol>_geom.json (bohr), a Psi4 frequency() input and a QCSchema
# hessian input at exactly the same geometry (rounded to 1e-12 bohr).
import json, sys
for name in ["water", "nh3"]:
    g = json.load(open(name + "_geom.json"))
    geom = [round(x, 12) + 0.0 for x in g["geometry"]]
    geom = [0.0 if x == 0 else x for x in geom]
    syms = g["symbols"]
    lines = ["%-2s %20.12f %20.12f %20.12f" % (s, *geom[3*i:3*i+3]) for i, s in enumerate(syms)]
    with open(name + "_freq.in", "w") as f:
        f.write("# %s HF/6-31G* harmonic frequencies at the optimised geometry (bohr, as in %s_hessian.json)\n" % (name, name))
        f.write("molecule {\n0 1\nunits bohr\nno_com\nno_reorient\n" + "\n".join(lines) + "\n}\n")
        f.write("set {\n  basis 6-31G*\n  scf_type pk\n  e_convergence 1e-10\n  d_convergence 1e-10\n}\n")
        f.write("frequency('hf')\n")
    inp = {
        "schema_name": "qcschema_input",
        "schema_version": 1,
        "molecule": {"symbols": syms, "geometry": geom, "fix_com": True, "fix_orientation": True},
        "driver": "hessian",
        "model": {"method": "hf", "basis": "6-31G*"},
        "keywords": {"scf_type": "pk", "e_convergence": 1e-10, "d_convergence": 1e-10},
    }
    with open(name + "_hessian.json", "w") as f:
        json.dump(inp, f, indent=1)
