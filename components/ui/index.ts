export { cn, type ClassValue } from "./cn";
export { Button, LinkButton, buttonClasses, type ButtonProps, type LinkButtonProps, type ButtonVariant, type ButtonSize } from "./button";
export {
  Field,
  Input,
  Select,
  Textarea,
  FieldError,
  FormError,
  type FieldProps,
  type FieldControlProps,
  type InputProps,
  type SelectProps,
  type TextareaProps,
  type FieldErrorProps,
  type FormErrorProps,
} from "./field";
export { Table, TableCaption, THead, TBody, TR, TH, TD, type TableProps, type CellAlignProps } from "./table";
export { DataTable, type DataTableProps, type DataTableColumnMeta } from "./data-table";
export { Dialog, ConfirmDialog, type DialogProps, type ConfirmDialogProps } from "./dialog";
export { Toaster, toast, type ToasterProps } from "./toast";
export {
  Card,
  CardHeader,
  CardTitle,
  CardDescription,
  CardBody,
  CardFooter,
  type CardHeaderProps,
  type CardTitleProps,
} from "./card";
export { Badge, RoleBadge, type BadgeProps, type BadgeTone, type RoleBadgeProps, type BadgeRole } from "./badge";
export { PageHeader, type PageHeaderProps } from "./page-header";
export { EmptyState, type EmptyStateProps } from "./empty-state";
export { Spinner, type SpinnerProps } from "./spinner";
export { Callout, type CalloutProps, type CalloutTone } from "./callout";
export { Stat, StatGroup, type StatProps } from "./stat";
export { Skeleton, SkeletonText, type SkeletonProps } from "./skeleton";
