"""The rigid-body view shows exactly what core.rigid_body computed (offscreen Qt)."""
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pytest  # noqa: E402

from app.rigid_body_view import VALUE_ROLE, RigidBodyView  # noqa: E402
from core.rigid_body import COORDINATES, Mount, RigidBody, modes, static_loads  # noqa: E402
from tests.test_rigid_body import decoupled_case  # noqa: E402  (REFERENCES §5 decoupled layout)

pytestmark = pytest.mark.gui


def cell_number(table, row, column):
    return float(table.item(row, column).text())


@pytest.fixture
def shown(qtbot):
    body, mounts = decoupled_case()
    result, loads = modes(body, mounts), static_loads(body, mounts)
    view = RigidBodyView()
    qtbot.addWidget(view)
    view.show_result(body, mounts, result, loads)
    return view, body, mounts, result, loads


def test_modes_table_holds_the_core_values(shown):
    view, _, _, result, _ = shown
    table = view.modes_table
    assert table.rowCount() == 6
    assert [table.horizontalHeaderItem(c).text() for c in range(3, 9)] == [f"{n} (%)" for n in COORDINATES]
    for row in range(6):
        assert table.item(row, 1).data(VALUE_ROLE) == result.frequencies_hz[row]
        assert cell_number(table, row, 1) == pytest.approx(result.frequencies_hz[row], rel=5e-4)
        assert table.item(row, 2).text() == result.dominant[row]
        for column in range(6):
            assert table.item(row, 3 + column).data(VALUE_ROLE) == result.energy_share[row, column]
            assert cell_number(table, row, 3 + column) == pytest.approx(100 * result.energy_share[row, column], abs=0.051)
    # the published frequencies of this layout (REFERENCES §5) appear on screen as rounded text
    shown_hz = [cell_number(table, row, 1) for row in range(6)]
    np.testing.assert_allclose(shown_hz, [3.183, 3.183, 3.629, 5.694, 6.366, 6.974], atol=6e-4)


def test_loads_table_holds_the_core_values(shown):
    view, _, mounts, _, loads = shown
    table = view.loads_table
    assert table.rowCount() == 4
    assert table.horizontalHeaderItem(4).text() == "Vertical load (N)"
    for row, mount in enumerate(mounts):
        assert table.item(row, 0).text() == mount.label
        assert table.item(row, 4).data(VALUE_ROLE) == loads.vertical_load_n[row]
        assert cell_number(table, row, 4) == pytest.approx(loads.vertical_load_n[row], rel=5e-4)
        for axis in range(3):
            assert table.item(row, 5 + axis).data(VALUE_ROLE) == loads.force_n[row, axis]
        # positions shown in mm (SI display length): 1 m = 1000 mm
        assert cell_number(table, row, 1) == pytest.approx(1000 * mount.position_m[0], rel=5e-4)
    # a quarter of the weight on each mount of this symmetric layout (statics)
    np.testing.assert_allclose([cell_number(table, r, 4) for r in range(4)], 1000 * 9.80665 / 4, rtol=5e-4)


def test_scatter_positions_are_the_mount_positions(shown):
    view, body, mounts, _, _ = shown
    positions_mm = 1000.0 * np.array([m.position_m for m in mounts])  # plots use mm (SI display length)
    plan_x, plan_y = view.plan_plot.mounts.getData()
    side_x, side_z = view.side_plot.mounts.getData()
    np.testing.assert_allclose(np.column_stack([plan_x, plan_y]), positions_mm[:, [0, 1]])
    np.testing.assert_allclose(np.column_stack([side_x, side_z]), positions_mm[:, [0, 2]])
    cg_x, cg_y = view.plan_plot.cg.getData()
    np.testing.assert_allclose([cg_x[0], cg_y[0]], 1000.0 * body.cg_m[:2])
    # equal loads → equal marker sizes
    sizes = [point.size() for point in view.plan_plot.mounts.points()]
    assert len(set(sizes)) == 1


def test_us_units_and_mount_in_tension(qtbot):
    body = RigidBody(100.0, np.diag([10.0, 10.0, 10.0]), (1.5, 0.2, 0.0))
    mounts = [Mount((0, 0, 0), (1e5,) * 3), Mount((1, 0, 0), (1e5,) * 3), Mount((0, 1, 0), (1e5,) * 3)]
    loads = static_loads(body, mounts)
    view = RigidBodyView(unit_system="US")
    qtbot.addWidget(view)
    view.show_result(body, mounts, modes(body, mounts), loads)
    # 1 in = 0.0254 m, 1 lbf = 4.4482216152605 N (exact definitions, 1959 international yard and pound)
    plan_x, _ = view.plan_plot.mounts.getData()
    np.testing.assert_allclose(plan_x, [0.0, 1 / 0.0254, 0.0])
    assert view.loads_table.horizontalHeaderItem(4).text() == "Vertical load (lbf)"
    assert cell_number(view.loads_table, 0, 4) == pytest.approx(loads.vertical_load_n[0] / 4.4482216152605, rel=5e-4)
    assert "pulled upward" in view.note_label.text()
    symbols = [point.symbol() for point in view.plan_plot.mounts.points()]
    assert symbols == ["t", "o", "o"]


def test_caution_is_shown(shown):
    view = shown[0]
    assert "licensed engineer" in view.caution_label.text()


def test_side_view_labels_mounts_on_one_spot_once(shown):
    # Side view (x–z): m0 and m1 sit at x = +0.6 m, m2 and m3 at x = -0.6 m, all at z = 0
    view = shown[0]
    texts = [item.toPlainText() for item in view.side_plot.label_items if item.isVisible()]
    assert texts == [" m0, m1", "", " m2, m3", ""]
    plan = [item.toPlainText() for item in view.plan_plot.label_items]
    assert plan == [" m0: 2452 N", " m1: 2452 N", " m2: 2452 N", " m3: 2452 N"]  # W/4 = 2451.66 N
