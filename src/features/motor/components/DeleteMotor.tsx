// "Delete motor" on the motor page (admins), after a confirmation. The server keeps a motor with history (captures,
// inspections): its 409 says so and what to do instead (move it or leave it), and the page shows that message.
import { useNavigate } from "react-router-dom";
import { Button } from "../../../components/Button.tsx";
import { errorMessage } from "../../../lib/api.ts";
import type { AssetDetail } from "../../../lib/contracts.ts";
import { useDeleteMotor } from "../api/update-motor.ts";

export function DeleteMotorButton({ motor, onRefused }: { motor: AssetDetail; onRefused: (message: string) => void }) {
  const del = useDeleteMotor(motor.id);
  const navigate = useNavigate();
  const onClick = async () => {
    if (!confirm(`Delete motor ${motor.tag} · ${motor.name} and its measurement points? Only a motor without captures or inspections can be deleted.`)) return;
    try {
      await del.mutateAsync();
      navigate("/motors", { replace: true });
    } catch (err) {
      onRefused(errorMessage(err));
    }
  };
  return (
    <Button variant="danger" onClick={onClick} disabled={del.isPending}>
      Delete motor
    </Button>
  );
}
