"""Evaluation of one request: geometry, mesh levels, solves, ψ, fRsi, certificate.

Interface (stable; the engine behind it is being written):

    evaluate(request: EvaluationRequest, progress: Callable[[str, float], None] | None = None)
        -> Evaluation

``Evaluation.result`` is the JSON-able result document of model-v1 (without ``id``; the API and
CLI add ``id = request_digest(request)``). ``Evaluation.field`` is the temperature field of the
final mesh for drawing: see ``FIELD_FORMAT`` below. ``progress(stage, fraction)`` is called with
stages "geometry", "meshing", "solving", "post-processing" and a fraction 0..1 of the whole.
"""

FIELD_FORMAT = """
{"unit": "m",
 "points": [[x, y], ...],            # metres
 "triangles": [[a, b, c], ...],      # 0-based indices into points (linear sub-triangles)
 "temperature": [θ, ...],            # °C per point, design (heat-flow) run
 "heat_flux": [q, ...],              # |q| in W/m² per triangle
 "material": [k, ...],               # index into "materials" per triangle
 "materials": [{"id": ..., "conductivity": [λx, λy]}],
 "pieces": [{"material": id, "polygon": [[x, y], ...], "holes": [[[x, y], ...]]}],  # metres
 "boundaries": [{"environment": id, "side": ..., "surface_resistance": R,
                 "segments": [[[x1, y1], [x2, y2]], ...]}],                        # metres
 "adiabatic": [[[x1, y1], [x2, y2]], ...],
 "min_surface": {"<env id>": {"temperature": θ, "at": [x, y]}},
 "condensation_min": {"temperature": θ, "at": [x, y]} | null}
"""
