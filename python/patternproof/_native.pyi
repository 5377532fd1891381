"""Type stubs of the compiled module. The public API is in ``patternproof``;
these functions take the options already normalised and return the JSON
document with the warnings the command line prints."""

from typing import Any, List, Optional, Sequence, Tuple, Union

Boundary = Tuple[str, str, Optional[str]]  # (kind "file" | "text", path or text, name)
Points = Union[str, bytes]  # a path, or native f64 bytes x0 y0 x1 y1 …
Gpkg = Tuple[Optional[str], Optional[str], Optional[str]]  # layer, boundary layer, where

def audit(
    points: Points,
    boundaries: Sequence[Boundary],
    coords: str,
    unit: str,
    drop_duplicates: bool,
    gpkg: Gpkg,
    buffers: Sequence[str],
    concavity: float,
    edges: Sequence[str],
    sims: int,
    seed: int,
    alpha: float,
    guard: Optional[float],
    area: Optional[float],
) -> Tuple[str, List[str], AuditFolder]: ...

class ScalesFolder:
    def write(self, dir: str, force: bool, command_line: str) -> List[str]: ...

class DensityFolder:
    def write(self, dir: str, force: bool, command_line: str) -> List[str]: ...

class SitesFolder:
    def write(self, dir: str, force: bool, command_line: str) -> List[str]: ...

class AuditFolder:
    def glance_html(self) -> str: ...
    def write(
        self,
        dir: str,
        force: bool,
        no_map: bool,
        picture_window: Optional[str],
        command_line: str,
    ) -> List[str]: ...

def recheck(
    n: str,
    given: Sequence[Tuple[str, str]],
    one_sided: bool,
    points: Optional[Points],
    boundaries: Sequence[Boundary],
    coords: str,
    unit: str,
    drop_duplicates: bool,
) -> Tuple[str, List[str]]: ...
def scales(
    points: Points,
    boundaries: Sequence[Boundary],
    coords: str,
    unit: str,
    drop_duplicates: bool,
    gpkg: Gpkg,
    buffers: Sequence[str],
    concavity: float,
    edges: Sequence[str],
    test_edges: Sequence[str],
    rmax: Optional[float],
    steps: int,
    sims: int,
    seed: int,
    alpha: float,
) -> Tuple[str, List[str], List[str], ScalesFolder]: ...
def density(
    points: Points,
    boundaries: Sequence[Boundary],
    coords: str,
    unit: str,
    drop_duplicates: bool,
    gpkg: Gpkg,
    kernels: Sequence[str],
    bandwidths: Sequence[str],
    cell: Optional[float],
    levels: Sequence[str],
    edges: Sequence[str],
    reference: str,
) -> Tuple[str, List[str], DensityFolder]: ...

class SiteRunHandle:
    def row_json(self) -> str: ...

class SitePlan:
    def names(self) -> List[str]: ...
    def warnings(self) -> List[str]: ...
    def run_site(self, index: int) -> SiteRunHandle: ...
    def combine(self, runs: Sequence[SiteRunHandle]) -> Tuple[str, SitesFolder]: ...
    def run_all(self) -> Tuple[str, SitesFolder]: ...

def plan_sites(
    protocol_file: str,
    inputs: Sequence[str],
    site_field: Optional[str],
    layer: Optional[str],
    where: Optional[str],
    boundaries: Optional[str],
    boundary_layer: Optional[str],
    boundary_field: str,
    coords: str,
    unit: str,
    drop_duplicates: bool,
    sweep_sims: int,
) -> SitePlan: ...

def arrow_points(
    obj: Any, pairs: Sequence[Tuple[str, str]]
) -> Tuple[Optional[Tuple[str, str]], bytes, List[str]]: ...

class ArrowTable:
    def __init__(self, columns: Sequence[Tuple[str, str, Sequence[Any]]]) -> None: ...
    @property
    def num_rows(self) -> int: ...
    @property
    def column_names(self) -> List[str]: ...
    def __arrow_c_stream__(self, requested_schema: Any = None) -> Any: ...

def protocol(
    window: str,
    edge: str,
    alpha: float,
    sims: int,
    seed: int,
    adjust: str,
    min_n: int,
    guard: Optional[float],
    concavity: float,
    note: Optional[str],
) -> Tuple[str, str, List[str]]: ...
def read_protocol(path: str) -> Tuple[str, str, List[str]]: ...
